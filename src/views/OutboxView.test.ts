// @vitest-environment happy-dom
import { DOMWrapper } from '@vue/test-utils'
import { afterEach, describe, expect, it, vi } from 'vitest'
import { fakeFetch } from '@/testing/fake-fetch'
import { mountWithApp } from '@/testing/mount-with-app'
import { settle } from '@/testing/settle'
import { orlaAdmin } from '@/testing/users'
import OutboxView from './OutboxView.vue'

const sent = {
  id: 7,
  to: 'nell@example.org',
  subject: 'Invitation to join Nimbus Neurite Lab on Nestwise',
  kind: 'invitation',
  status: 'sent',
  attempts: 1,
  lastError: null,
  createdAt: '2026-12-01T09:00:00.000Z',
  nextAttemptAt: '2026-12-01T09:00:00.000Z',
  sentAt: '2026-12-01T09:00:01.000Z',
  messageId: '<a@nestwise>',
  receivedMailId: 3,
}
const failed = {
  ...sent,
  id: 8,
  to: 'theo@example.org',
  status: 'failed',
  attempts: 5,
  lastError: 'ECONNREFUSED: refused',
  receivedMailId: null,
  sentAt: null,
}
const link = `http://127.0.0.1:3000/join#${'Q'.repeat(43)}`

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

describe('OutboxView', () => {
  it('lists queued and sent mail, opens the caught copy with its link, and re-sends a failed message', async () => {
    const fake = fakeFetch({
      'GET /api/v1/auth/session': { status: 200, body: { data: orlaAdmin } },
      'GET /api/v1/admin/mail/delivery': {
        status: 200,
        body: {
          data: { mode: 'fake', host: '127.0.0.1', port: 2525, from: 'Nestwise <no-reply@nestwise.invalid>' },
        },
      },
      'GET /api/v1/admin/mail/outbox?page=1&pageSize=25': {
        status: 200,
        body: { data: { items: [sent, failed], total: 2, page: 1, pageSize: 25 } },
      },
      'GET /api/v1/admin/mail/received/3': {
        status: 200,
        body: {
          data: {
            id: 3,
            receivedAt: '2026-12-01T09:00:01.000Z',
            envelopeTo: ['nell@example.org'],
            from: 'Nestwise <no-reply@nestwise.invalid>',
            to: 'nell@example.org',
            subject: sent.subject,
            messageId: '<a@nestwise>',
            text: `Open this link to accept:\n${link}\n<script>alert(1)</script>`,
            html: null,
            raw: 'Subject: x',
          },
        },
      },
      'POST /api/v1/admin/mail/outbox/8/retry': {
        status: 200,
        body: { data: { ...failed, status: 'queued', attempts: 0 } },
      },
    })
    vi.stubGlobal('fetch', fake.fetch)
    const { wrapper } = await mountWithApp(OutboxView, { path: '/admin/outbox' })
    await settle()

    expect(wrapper.find('[data-testid="mail-delivery"]').text()).toContain(
      'local fake SMTP server (127.0.0.1:2525)',
    )
    const table = wrapper.find('[data-testid="outbox-table"]')
    expect(table.text()).toContain('nell@example.org')
    expect(table.text()).toContain('ECONNREFUSED: refused')

    await wrapper.find('[data-testid="read-mail-7"]').trigger('click')
    await settle()
    const dialog = new DOMWrapper(document.querySelector('[data-testid="received-mail"]')!)
    const anchor = dialog.find('a[href*="/join#"]')
    expect(anchor.attributes('href')).toBe(link)
    // Message text is shown as text, never as markup.
    expect(dialog.find('script').exists()).toBe(false)
    expect(dialog.text()).toContain('<script>alert(1)</script>')

    const retry = wrapper.findAll('button').find((b) => b.text() === 'Send again')!
    await retry.trigger('click')
    await settle()
    expect(
      fake.calls.some((c) => c.method === 'POST' && c.path === '/api/v1/admin/mail/outbox/8/retry'),
    ).toBe(true)
    expect(wrapper.find('[data-testid="outbox-table"]').text()).toContain('Queued')
  })
})
