import { defineStore } from 'pinia'
import { ref } from 'vue'
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

  async function changeRole(userId: number, role: Role): Promise<boolean> {
    if (labId.value === null) return false
    busyId.value = userId
    memberError.value = null
    try {
      const updated = await labsApi.changeMemberRole(labId.value, userId, role)
      members.value = members.value.map((m) => (m.userId === userId ? updated : m))
      return true
    } catch (error) {
      memberError.value = asApiError(error)
      return false
    } finally {
      busyId.value = null
    }
  }

  async function remove(userId: number): Promise<boolean> {
    if (labId.value === null) return false
    busyId.value = userId
    memberError.value = null
    try {
      await labsApi.removeMember(labId.value, userId)
      members.value = members.value.filter((m) => m.userId !== userId)
      return true
    } catch (error) {
      memberError.value = asApiError(error)
      return false
    } finally {
      busyId.value = null
    }
  }

  async function revoke(invitationId: number): Promise<boolean> {
    if (labId.value === null) return false
    busyId.value = invitationId
    invitationError.value = null
    try {
      const revoked = await labsApi.revokeInvitation(labId.value, invitationId)
      invitations.value = invitations.value.map((i) => (i.id === invitationId ? revoked : i))
      return true
    } catch (error) {
      invitationError.value = asApiError(error)
      return false
    } finally {
      busyId.value = null
    }
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
