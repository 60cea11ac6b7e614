import type { Role } from '../../../shared/schemas/auth'
import type { OutgoingMail } from '../outgoing-mail'

const roleNames: Record<Role, string> = {
  scientist: 'scientist',
  pi: 'PI (lab head)',
  biostatistician: 'biostatistician',
}

function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`)
}

export interface InvitationMailInput {
  to: string
  labName: string
  role: Role
  inviterName: string
  link: string
  expiresAt: Date
}

/** The e-mail that carries an invitation link. The link is the only copy of the token. */
export function invitationMail(input: InvitationMailInput): OutgoingMail {
  const role = roleNames[input.role]
  const expires = input.expiresAt.toUTCString()
  const text = [
    `Hello,`,
    ``,
    `${input.inviterName} invites you to join ${input.labName} on Nestwise as ${role}.`,
    ``,
    `Open this link to accept (it works once, until ${expires}):`,
    input.link,
    ``,
    `If you already have a Nestwise account with this address, sign in on that page with your`,
    `password; otherwise choose a name and a password there.`,
    ``,
    `If you did not expect this invitation, you can ignore this message.`,
    ``,
    `Nestwise — honest statistics for nested lab data`,
  ].join('\n')
  const html = [
    `<p>Hello,</p>`,
    `<p>${escapeHtml(input.inviterName)} invites you to join <strong>${escapeHtml(input.labName)}</strong> on Nestwise as ${escapeHtml(role)}.</p>`,
    `<p><a href="${escapeHtml(input.link)}">Accept the invitation</a> (the link works once, until ${escapeHtml(expires)}).</p>`,
    `<p>If you already have a Nestwise account with this address, sign in on that page with your password; otherwise choose a name and a password there.</p>`,
    `<p>If you did not expect this invitation, you can ignore this message.</p>`,
  ].join('\n')
  return {
    to: input.to,
    subject: `Invitation to join ${input.labName} on Nestwise`,
    text,
    html,
    kind: 'invitation',
  }
}
