// @vitest-environment happy-dom
import { DOMWrapper } from '@vue/test-utils'
import { afterEach, describe, expect, it, vi } from 'vitest'
import { fakeFetch } from '@/testing/fake-fetch'
import { mountWithApp } from '@/testing/mount-with-app'
import { settle } from '@/testing/settle'
import { petraPi } from '@/testing/users'
import LabMembersView from './LabMembersView.vue'

const members = [
  { userId: 2, name: 'Petra Nimbus', email: 'petra@example.org', role: 'pi' },
  { userId: 3, name: 'Sami Reed', email: 'sami@example.org', role: 'scientist' },
]
const invitation = {
  id: 40,
  labId: 1,
  email: 'nell@example.org',
  role: 'biostatistician',
  status: 'pending',
  createdAt: '2026-12-01T09:00:00.000Z',
  expiresAt: '2026-12-08T09:00:00.000Z',
  invitedBy: { id: 2, name: 'Petra Nimbus' },
}

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

describe('LabMembersView', () => {
  it('lists the PI’s lab members and open invitations', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'GET /api/v1/auth/session': { status: 200, body: { data: petraPi } },
        'GET /api/v1/labs/1/members': { status: 200, body: { data: members } },
        'GET /api/v1/labs/1/invitations': { status: 200, body: { data: [invitation] } },
      }).fetch,
    )
    const { wrapper } = await mountWithApp(LabMembersView, { path: '/lab/members' })
    await settle()
    expect(wrapper.find('[data-testid="lab-name"]').text()).toBe('Nimbus Neurite Lab')
    expect(wrapper.find('[data-testid="member-3"]').text()).toContain('sami@example.org')
    const row = wrapper.find('[data-testid="invitation-40"]')
    expect(row.text()).toContain('nell@example.org')
    expect(row.text()).toContain('Biostatistician')
    expect(row.text()).toContain('Waiting')
    expect(row.text()).toContain('Withdraw')
  })

  it('invites by e-mail with the chosen role and confirms it', async () => {
    const fake = fakeFetch({
      'GET /api/v1/auth/session': { status: 200, body: { data: petraPi } },
      'GET /api/v1/labs/1/members': { status: 200, body: { data: members } },
      'GET /api/v1/labs/1/invitations': { status: 200, body: { data: [] } },
      'POST /api/v1/labs/1/invitations': {
        status: 201,
        body: { data: { ...invitation, role: 'scientist' } },
      },
    })
    vi.stubGlobal('fetch', fake.fetch)
    const { wrapper } = await mountWithApp(LabMembersView, { path: '/lab/members' })
    await settle()
    await wrapper.find('[data-testid="invite-open"]').trigger('click')
    await settle()
    // The dialog is teleported to the document body, outside the wrapper.
    const dialog = new DOMWrapper(document.querySelector('[data-testid="invite-dialog"]')!)
    await dialog.find('input[type="email"]').setValue('nell@example.org')
    await dialog.find('form').trigger('submit')
    await settle()

    await vi.waitFor(() => expect(fake.calls.some((c) => c.method === 'POST')).toBe(true))
    const post = fake.calls.find((c) => c.method === 'POST')!
    expect(JSON.parse(String(post.init.body))).toEqual({ email: 'nell@example.org', role: 'scientist' })
    await vi.waitFor(() =>
      expect(document.querySelector('[data-testid="invite-notice"]')?.textContent).toBe(
        'Invitation sent to nell@example.org.',
      ),
    )
  })

  it('shows why a role change was refused', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'GET /api/v1/auth/session': { status: 200, body: { data: petraPi } },
        'GET /api/v1/labs/1/members': { status: 200, body: { data: members } },
        'GET /api/v1/labs/1/invitations': { status: 200, body: { data: [] } },
        'PATCH /api/v1/labs/1/members/2': {
          status: 409,
          body: {
            error: {
              code: 'CONFLICT',
              message: 'This is the last PI of the lab: a lab needs at least one PI.',
            },
          },
        },
      }).fetch,
    )
    const { wrapper } = await mountWithApp(LabMembersView, { path: '/lab/members' })
    await settle()
    const { useLabMembersStore } = await import('@/stores/lab-members')
    await useLabMembersStore().changeRole(2, 'scientist')
    await settle()
    expect(wrapper.find('[data-testid="error-notice"]').text()).toContain('a lab needs at least one PI')
  })
})
