import { describe, expect, it } from 'vitest'
import { reviewDecisionMail, reviewRequestMail, shareLinkMail } from './review-mails'

const link = 'http://127.0.0.1:3000/analyses/7?version=2'

describe('review and share mails', () => {
  it('asks the reviewer by name, with the note and the link, and escapes HTML', () => {
    const mail = reviewRequestMail({
      to: 'bea@example.org',
      reviewerName: 'Bea Stone',
      requesterName: 'Sami <Reed>',
      analysisName: 'Neurite length',
      versionNo: 2,
      labName: 'Nimbus Neurite Lab',
      message: 'Mice as units?',
      link,
    })
    expect(mail).toMatchObject({ to: 'bea@example.org', kind: 'review_request' })
    expect(mail.subject).toBe('Review requested: Neurite length (version 2)')
    expect(mail.text).toContain('Mice as units?')
    expect(mail.text).toContain(link)
    expect(mail.html).toContain('Sami &#60;Reed&#62;')
    expect(mail.html).not.toContain('<Reed>')
  })

  it('names the decision in the subject', () => {
    const base = { to: 'sami@example.org', reviewerName: 'Bea Stone', analysisName: 'A', versionNo: 1, link }
    expect(reviewDecisionMail({ ...base, decision: 'signed_off' }).subject).toBe('Signed off: A (version 1)')
    const changes = reviewDecisionMail({
      ...base,
      decision: 'changes_requested',
      comment: 'Exclude plate 3.',
    })
    expect(changes.subject).toBe('Changes requested: A (version 1)')
    expect(changes.text).toContain('Exclude plate 3.')
    expect(changes.kind).toBe('review_decision')
  })

  it('carries the share link and its expiry', () => {
    const mail = shareLinkMail({
      to: 'guest@example.org',
      senderName: 'Petra Nimbus',
      analysisName: 'A',
      link: 'http://127.0.0.1:3000/s/abc',
      expiresAt: new Date('2027-01-01T00:00:00Z'),
    })
    expect(mail.kind).toBe('share_link')
    expect(mail.text).toContain('http://127.0.0.1:3000/s/abc')
    expect(mail.text).toContain('Fri, 01 Jan 2027 00:00:00 GMT')
  })
})
