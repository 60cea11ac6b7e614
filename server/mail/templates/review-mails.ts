import type { OutgoingMail } from '../outgoing-mail'

function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`)
}

const footer = 'Nestwise — honest statistics for nested lab data'

export interface ReviewRequestMailInput {
  to: string
  reviewerName: string
  requesterName: string
  analysisName: string
  versionNo: number
  labName: string
  message: string
  link: string
}

/** Tells a biostatistician that a version waits for their review. */
export function reviewRequestMail(input: ReviewRequestMailInput): OutgoingMail {
  const text = [
    `Hello ${input.reviewerName},`,
    ``,
    `${input.requesterName} asks you to review version ${input.versionNo} of "${input.analysisName}" (${input.labName}).`,
    ...(input.message ? [``, `Their note:`, input.message] : []),
    ``,
    `Open the analysis to read the model and warnings, comment, ask for changes or sign off:`,
    input.link,
    ``,
    footer,
  ].join('\n')
  const html = [
    `<p>Hello ${escapeHtml(input.reviewerName)},</p>`,
    `<p>${escapeHtml(input.requesterName)} asks you to review version ${input.versionNo} of <strong>${escapeHtml(input.analysisName)}</strong> (${escapeHtml(input.labName)}).</p>`,
    ...(input.message ? [`<blockquote>${escapeHtml(input.message)}</blockquote>`] : []),
    `<p><a href="${escapeHtml(input.link)}">Open the analysis</a></p>`,
  ].join('\n')
  return {
    to: input.to,
    subject: `Review requested: ${input.analysisName} (version ${input.versionNo})`,
    text,
    html,
    kind: 'review_request',
  }
}

export interface ReviewDecisionMailInput {
  to: string
  reviewerName: string
  analysisName: string
  versionNo: number
  decision: 'signed_off' | 'changes_requested'
  comment?: string
  link: string
}

/** Tells the requester what the reviewer decided. */
export function reviewDecisionMail(input: ReviewDecisionMailInput): OutgoingMail {
  const verdict =
    input.decision === 'signed_off'
      ? `signed off version ${input.versionNo}`
      : `asks for changes to version ${input.versionNo}`
  const text = [
    `Hello,`,
    ``,
    `${input.reviewerName} ${verdict} of "${input.analysisName}".`,
    ...(input.comment ? [``, input.comment] : []),
    ``,
    input.link,
    ``,
    footer,
  ].join('\n')
  const html = [
    `<p>${escapeHtml(input.reviewerName)} ${escapeHtml(verdict)} of <strong>${escapeHtml(input.analysisName)}</strong>.</p>`,
    ...(input.comment ? [`<blockquote>${escapeHtml(input.comment)}</blockquote>`] : []),
    `<p><a href="${escapeHtml(input.link)}">Open the analysis</a></p>`,
  ].join('\n')
  const subject =
    input.decision === 'signed_off'
      ? `Signed off: ${input.analysisName} (version ${input.versionNo})`
      : `Changes requested: ${input.analysisName} (version ${input.versionNo})`
  return { to: input.to, subject, text, html, kind: 'review_decision' }
}

export interface ShareLinkMailInput {
  to: string
  senderName: string
  analysisName: string
  link: string
  expiresAt: Date
}

/** Carries a read-only link to someone without an account. */
export function shareLinkMail(input: ShareLinkMailInput): OutgoingMail {
  const expires = input.expiresAt.toUTCString()
  const text = [
    `Hello,`,
    ``,
    `${input.senderName} shares a read-only result with you: "${input.analysisName}".`,
    `No account is needed. The link works until ${expires}:`,
    input.link,
    ``,
    footer,
  ].join('\n')
  const html = [
    `<p>${escapeHtml(input.senderName)} shares a read-only result with you: <strong>${escapeHtml(input.analysisName)}</strong>.</p>`,
    `<p><a href="${escapeHtml(input.link)}">Open the result</a> (no account needed; works until ${escapeHtml(expires)}).</p>`,
  ].join('\n')
  return { to: input.to, subject: `Shared result: ${input.analysisName}`, text, html, kind: 'share_link' }
}
