import { expect as baseExpect, test } from '@playwright/test'
import { attachScreenshot, signIn } from './support/demo'

// Three browsers at once on a shared, busy machine: give each wait more room than the default.
const expect = baseExpect.configure({ timeout: 30_000 })

/**
 * The invitation story end to end: the PI invites a new scientist, the admin reads the e-mail the
 * local fake SMTP server caught, and the invitee opens the link in a fresh browser, sets a password
 * and lands in the lab.
 */
test('a PI invites a new scientist, who joins the lab through the e-mailed link', async ({
  browser,
  page,
}, testInfo) => {
  // Three people in three browsers on a busy machine: more time than a single-page test.
  test.setTimeout(180_000)
  const email = `nell.vane.${Date.now()}@example.org`

  // Petra (PI) sends the invitation.
  await page.goto('/sign-in')
  await signIn(page, 'petra@example.org')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Petra')
  await page.getByTestId('nav-lab-members').click()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Lab members')
  await expect(page.getByTestId('lab-name')).toHaveText('Nimbus Neurite Lab')
  await expect(page.getByTestId('members-table')).toContainText('sami@example.org')
  await page.getByTestId('invite-open').click()
  const dialog = page.getByTestId('invite-dialog')
  await dialog.getByLabel('E-mail address').fill(email)
  await dialog.getByRole('button', { name: 'Send invitation' }).click()
  await expect(page.getByTestId('invite-notice')).toHaveText(`Invitation sent to ${email}.`)
  const invitationRow = page.getByTestId('invitations-table').locator('tr', { hasText: email })
  await expect(invitationRow).toContainText('Scientist')
  await expect(invitationRow).toContainText('Waiting')
  await attachScreenshot(page, testInfo, 'PI: invitation sent')

  // Orla (admin) reads the caught e-mail in the Outbox page.
  const adminContext = await browser.newContext()
  const admin = await adminContext.newPage()
  await admin.goto('/sign-in')
  await signIn(admin, 'orla@example.org')
  await expect(admin.getByRole('heading', { level: 1 })).toHaveText('Welcome, Orla')
  await admin.getByTestId('nav-admin-outbox').click()
  await expect(admin.getByRole('heading', { level: 1 })).toHaveText('Outbox')
  await expect(admin.getByTestId('mail-delivery')).toContainText('local fake SMTP server')
  const mailRow = admin.getByTestId('outbox-table').locator('tr', { hasText: email })
  // Sending happens right after the invitation was saved; refresh until the row shows it.
  await expect(async () => {
    await admin.getByTestId('outbox-refresh').click()
    await expect(mailRow).toContainText('Sent', { timeout: 1000 })
    await expect(mailRow.getByRole('button', { name: 'Read' })).toBeVisible({ timeout: 1000 })
  }).toPass({ timeout: 20_000 })
  await expect(mailRow).toContainText('Invitation to join Nimbus Neurite Lab on Nestwise')
  await mailRow.getByRole('button', { name: 'Read' }).click()
  const message = admin.getByTestId('received-mail')
  await expect(message).toContainText(
    'Petra Nimbus invites you to join Nimbus Neurite Lab on Nestwise as scientist.',
  )
  const link = message.locator('a[href*="/join#"]')
  await expect(link).toHaveCount(1)
  const href = await link.getAttribute('href')
  // The link is built from PUBLIC_URL, which is the server's own address in the browser tests.
  expect(href).toMatch(new RegExp(`^http://127\\.0\\.0\\.1:${process.env.E2E_PORT}/join#[A-Za-z0-9_-]{43}$`))
  await attachScreenshot(admin, testInfo, 'admin: the invitation e-mail in the Outbox')
  await adminContext.close()

  // Nell opens the link in a browser that has never seen Nestwise.
  const freshContext = await browser.newContext()
  const invitee = await freshContext.newPage()
  await invitee.goto(href!)
  await expect(invitee.getByTestId('join-title')).toHaveText('Join Nimbus Neurite Lab')
  await expect(invitee.getByText(email)).toBeVisible()
  await invitee.getByLabel('Your name').fill('Nell Vane')
  await invitee.getByLabel('New password', { exact: true }).fill('a long new password')
  await invitee.getByLabel('Repeat the password').fill('a long new password')
  await attachScreenshot(invitee, testInfo, 'invitee: the invitation landing page')
  await invitee.getByRole('button', { name: 'Create account and join' }).click()

  await expect(invitee).toHaveURL(/\/$/)
  await expect(invitee.getByRole('heading', { level: 1 })).toHaveText('Welcome, Nell')
  const labRole = invitee.getByTestId('lab-role')
  await expect(labRole).toHaveCount(1)
  await expect(labRole).toContainText('Nimbus Neurite Lab')
  await expect(labRole).toContainText('Scientist')
  await attachScreenshot(invitee, testInfo, 'invitee: signed in, in the lab')

  // The link is used up: opening it again explains so.
  const second = await freshContext.newPage()
  await freshContext.clearCookies()
  await second.goto(href!)
  await expect(second.getByText('This invitation has already been used.')).toBeVisible()
  await freshContext.close()

  // Back with Petra: Nell is a member and the invitation shows as joined.
  await page.reload()
  await expect(page.getByTestId('members-table')).toContainText(email)
  await expect(invitationRow).toContainText('Joined')
  await attachScreenshot(page, testInfo, 'PI: the new member')
})
