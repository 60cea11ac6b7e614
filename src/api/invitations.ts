import type {
  InvitationAccept,
  InvitationAcceptResult,
  InvitationPreview,
} from '../../shared/schemas/invitations'
import { request } from './http'

const base = '/api/v1/invitations'

// Both are POSTs: the token travels in the body. A 401 here means "wrong password", not an expired
// session, so the central sign-out handler stays out of it.
export function lookupInvitation(token: string): Promise<InvitationPreview> {
  return request<InvitationPreview>(`${base}/lookup`, {
    method: 'POST',
    body: { token },
    skipUnauthenticatedHandler: true,
  })
}

export function acceptInvitation(input: InvitationAccept): Promise<InvitationAcceptResult> {
  return request<InvitationAcceptResult>(`${base}/accept`, {
    method: 'POST',
    body: input,
    skipUnauthenticatedHandler: true,
  })
}
