import { defineStore } from 'pinia'
import { ref, type Ref } from 'vue'
import type { Role } from '../../shared/schemas/auth'
import type { InvitationCreate, InvitationSummary } from '../../shared/schemas/invitations'
import type { LabMember } from '../../shared/schemas/labs'
import * as labsApi from '@/api/labs'
import { ApiError, asApiError } from '@/api/http'

/**
 * One lab's people as its PI (or an admin) manages them: members with their roles, and the
 * invitations sent. Each action keeps its own error for the part of the page it concerns.
 */
export const useLabMembersStore = defineStore('lab-members', () => {
  const labId = ref<number | null>(null)
  const members = ref<LabMember[]>([])
  const invitations = ref<InvitationSummary[]>([])
  const loading = ref(false)
  const loadError = ref<ApiError | null>(null)

  const inviting = ref(false)
  const inviteError = ref<ApiError | null>(null)
  /** The member or invitation a change is running for (its row shows the spinner). */
  const busyId = ref<number | null>(null)
  const memberError = ref<ApiError | null>(null)
  const invitationError = ref<ApiError | null>(null)

  async function open(id: number): Promise<void> {
    if (labId.value !== id) {
      members.value = []
      invitations.value = []
    }
    labId.value = id
    loading.value = true
    loadError.value = null
    memberError.value = null
    invitationError.value = null
    try {
      const [people, sent] = await Promise.all([labsApi.listMembers(id), labsApi.listInvitations(id)])
      members.value = people
      invitations.value = sent
    } catch (error) {
      loadError.value = asApiError(error)
    } finally {
      loading.value = false
    }
  }

  async function refreshInvitations(): Promise<void> {
    if (labId.value !== null) invitations.value = await labsApi.listInvitations(labId.value)
  }

  async function invite(input: InvitationCreate): Promise<InvitationSummary | null> {
    if (labId.value === null) return null
    inviting.value = true
    inviteError.value = null
    try {
      const created = await labsApi.createInvitation(labId.value, input)
      await refreshInvitations()
      return created
    } catch (error) {
      inviteError.value = asApiError(error)
      return null
    } finally {
      inviting.value = false
    }
  }

  /**
   * Runs a change on one row: that row shows the spinner, and a failure lands in the error of the
   * table it concerns. Answers whether the change went through.
   */
  async function rowChange(
    rowId: number,
    error: Ref<ApiError | null>,
    change: (labId: number) => Promise<void>,
  ): Promise<boolean> {
    if (labId.value === null) return false
    busyId.value = rowId
    error.value = null
    try {
      await change(labId.value)
      return true
    } catch (caught) {
      error.value = asApiError(caught)
      return false
    } finally {
      busyId.value = null
    }
  }

  function changeRole(userId: number, role: Role): Promise<boolean> {
    return rowChange(userId, memberError, async (lab) => {
      const updated = await labsApi.changeMemberRole(lab, userId, role)
      members.value = members.value.map((m) => (m.userId === userId ? updated : m))
    })
  }

  function remove(userId: number): Promise<boolean> {
    return rowChange(userId, memberError, async (lab) => {
      await labsApi.removeMember(lab, userId)
      members.value = members.value.filter((m) => m.userId !== userId)
    })
  }

  function revoke(invitationId: number): Promise<boolean> {
    return rowChange(invitationId, invitationError, async (lab) => {
      const revoked = await labsApi.revokeInvitation(lab, invitationId)
      invitations.value = invitations.value.map((i) => (i.id === invitationId ? revoked : i))
    })
  }

  return {
    labId,
    members,
    invitations,
    loading,
    loadError,
    inviting,
    inviteError,
    busyId,
    memberError,
    invitationError,
    open,
    invite,
    changeRole,
    remove,
    revoke,
  }
})
