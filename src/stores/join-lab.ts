import { defineStore } from 'pinia'
import { ref } from 'vue'
import type {
  InvitationAccept,
  InvitationAcceptResult,
  InvitationPreview,
} from '../../shared/schemas/invitations'
import * as invitationsApi from '@/api/invitations'
import { ApiError, asApiError } from '@/api/http'

/** The invitation landing page: what the link offers, and accepting it. */
export const useJoinLabStore = defineStore('join-lab', () => {
  const preview = ref<InvitationPreview | null>(null)
  const looking = ref(false)
  const lookupError = ref<ApiError | null>(null)
  const accepting = ref(false)
  const acceptError = ref<ApiError | null>(null)
  const joined = ref<InvitationAcceptResult | null>(null)

  async function lookup(token: string): Promise<void> {
    looking.value = true
    lookupError.value = null
    preview.value = null
    joined.value = null
    try {
      preview.value = await invitationsApi.lookupInvitation(token)
    } catch (error) {
      lookupError.value = asApiError(error)
    } finally {
      looking.value = false
    }
  }

  async function accept(input: InvitationAccept): Promise<InvitationAcceptResult | null> {
    accepting.value = true
    acceptError.value = null
    try {
      joined.value = await invitationsApi.acceptInvitation(input)
      return joined.value
    } catch (error) {
      acceptError.value = asApiError(error)
      return null
    } finally {
      accepting.value = false
    }
  }

  return { preview, looking, lookupError, accepting, acceptError, joined, lookup, accept }
})
