import { expect as baseExpect, test } from '@playwright/test'
import { attachScreenshot, signIn } from './support/demo'

// Several browsers at once on a shared, busy machine: give each wait more room than the default.
const expect = baseExpect.configure({ timeout: 30_000 })

const ANALYSIS = 'Neurite length, NW-117 vs vehicle'

/**
 * The team story end to end on the seeded single-lab analysis: the scientist asks the lab's
 * biostatistician for a review; the admin reads the request e-mail the local fake SMTP server
 * caught; the biostatistician follows its link, comments and signs off; the PI finds the analysis
 * on the lab board with its unit badge and shares a read-only link; a browser without an account
 * opens it and sees the result and nothing else.
 */
test('review, sign-off, lab board and a read-only link, across five people', async ({
  browser,
  page,
}, testInfo) => {
  test.setTimeout(300_000)

  // Sami (scientist) asks Bea for a review.
  await page.goto('/sign-in')
  await signIn(page, 'sami@example.org')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Sami')
  await page.getByTestId('nav-analyses').click()
  await page.getByTestId('analyses-list').getByText(ANALYSIS, { exact: true }).click()
  await expect(page.getByTestId('analysis-name')).toHaveText(ANALYSIS)
  const review = page.getByTestId('review-panel')
  await expect(review.getByTestId('sign-off-status')).toContainText('not signed off')
  await review.getByTestId('reviewer-select').click()
  await page.getByRole('option', { name: 'Bea Stone' }).click()
  await review.getByTestId('review-message').locator('input').fill('Are the mice the right unit here?')
  await review.getByTestId('send-review-request').click()
  await expect(review.getByTestId('review-requests')).toContainText('Sami Reed → Bea Stone')
  await expect(review.getByTestId('review-requests')).toContainText('waiting for review')
  await review.scrollIntoViewIfNeeded()
  await attachScreenshot(page, testInfo, 'scientist: review requested')

  // Orla (admin) reads the request e-mail in the Outbox.
  const adminContext = await browser.newContext()
  const admin = await adminContext.newPage()
  await admin.goto('/sign-in')
  await signIn(admin, 'orla@example.org')
  await expect(admin.getByRole('heading', { level: 1 })).toHaveText('Welcome, Orla')
  await admin.getByTestId('nav-admin-outbox').click()
  const mailRow = admin
    .getByTestId('outbox-table')
    .locator('tr', { hasText: `Review requested: ${ANALYSIS}` })
    .first()
  await expect(async () => {
    await admin.getByTestId('outbox-refresh').click()
    await expect(mailRow).toContainText('Sent', { timeout: 1000 })
    await expect(mailRow.getByRole('button', { name: 'Read' })).toBeVisible({ timeout: 1000 })
  }).toPass({ timeout: 30_000 })
  await mailRow.getByRole('button', { name: 'Read' }).click()
  const message = admin.getByTestId('received-mail')
  await expect(message).toContainText('Sami Reed asks you to review version 1')
  await expect(message).toContainText('Are the mice the right unit here?')
  const href = await message.locator('a[href*="/analyses/"]').first().getAttribute('href')
  expect(href).toMatch(/\/analyses\/\d+\?version=1$/)
  await attachScreenshot(admin, testInfo, 'admin: the review request e-mail')
  await adminContext.close()

  // Bea (biostatistician) follows the link, signs in, comments and signs off.
  const bioContext = await browser.newContext()
  const bio = await bioContext.newPage()
  await bio.goto(href!)
  await expect(bio).toHaveURL(/\/sign-in/)
  await signIn(bio, 'bea@example.org')
  await expect(bio.getByTestId('analysis-name')).toHaveText(ANALYSIS)
  // Her overview says what waits for her: this review, linked.
  await bio.getByTestId('nav-overview').click()
  const waiting = bio.locator('[data-testid="next-step"][data-step="reviews-waiting"]')
  await expect(waiting).toContainText(ANALYSIS)
  await attachScreenshot(bio, testInfo, 'biostatistician: the overview with a review waiting')
  await waiting
    .getByRole('link', { name: new RegExp(ANALYSIS) })
    .first()
    .click()
  await expect(bio.getByTestId('analysis-name')).toHaveText(ANALYSIS)
  const bioReview = bio.getByTestId('review-panel')
  await bioReview
    .getByTestId('new-comment')
    .locator('textarea')
    .first()
    .fill('Mice are the units; 5 per arm, and the nested test is the one to report.')
  await bioReview.getByTestId('post-comment').click()
  await expect(bioReview.getByTestId('review-comment')).toContainText('5 per arm')
  await bioReview
    .getByTestId('decision-comment')
    .locator('textarea')
    .first()
    .fill('Model, units and warnings checked.')
  await expect(bio.getByTestId('sign-off-chip')).toContainText('Not signed off')
  await bioReview.getByTestId('sign-off').click()
  // Signing off asks first, naming the version and the fingerprint it vouches for.
  const confirm = bio.getByRole('dialog')
  await expect(confirm).toContainText(`Sign off version 1 of “${ANALYSIS}”?`)
  await expect(bio.getByTestId('sign-off-confirm-fingerprint')).toHaveText(/^([0-9a-f]{8} ){7}[0-9a-f]{8}$/)
  await attachScreenshot(bio, testInfo, 'biostatistician: the sign-off confirmation')
  await bio.getByTestId('sign-off-confirm-button').click()
  await expect(bioReview.getByTestId('sign-off-status')).toContainText('signed off by Bea Stone')
  // The chip by the version selector says so at the top of the page.
  await expect(bio.getByTestId('sign-off-chip')).toContainText('Signed off by Bea Stone')
  await bio.getByTestId('nav-reviews').click()
  await expect(bio.getByTestId('my-reviews')).toContainText(ANALYSIS)
  await expect(bio.getByTestId('my-reviews')).toContainText('signed off')
  await attachScreenshot(bio, testInfo, 'biostatistician: reviews inbox after signing off')
  await bioContext.close()

  // Petra (PI) sees the board, opens the analysis and shares a read-only link.
  const piContext = await browser.newContext()
  const pi = await piContext.newPage()
  await pi.goto('/sign-in')
  await signIn(pi, 'petra@example.org')
  await pi.getByTestId('nav-lab-board').click()
  await expect(pi.getByRole('heading', { level: 1 })).toHaveText('Lab board')
  const row = pi.getByTestId('lab-board').locator('tr', { hasText: ANALYSIS })
  // 5 mice per arm in the demo table: the amber badge, with its number and what it means.
  await expect(row.getByTestId('unit-count-badge')).toHaveText(/5 units · 3–5 per arm/)
  await expect(row.getByTestId('unit-count-badge')).toHaveAttribute('data-adequacy', 'thin')
  await expect(row.getByTestId('board-review-status')).toHaveText('signed off')
  await attachScreenshot(pi, testInfo, 'PI: the lab board')
  await row.click()
  await expect(pi.getByTestId('analysis-name')).toHaveText(ANALYSIS)
  const share = pi.getByTestId('share-links-panel')
  await share.getByTestId('create-share-link').click()
  const url = await share.getByTestId('share-url').textContent()
  expect(url).toMatch(/\/s\/[A-Za-z0-9_-]{43}$/)
  await expect(share.getByTestId('share-links-table')).toContainText('active')
  await share.scrollIntoViewIfNeeded()
  await attachScreenshot(pi, testInfo, 'PI: a read-only link created')
  // The lab's audit log says so in a sentence, with a link to the analysis; no raw keys.
  await pi.getByTestId('nav-lab-audit').click()
  const entries = pi.getByTestId('audit-sentence')
  await expect(
    entries.filter({ hasText: 'Created a read-only link to version 1 of the analysis' }).first(),
  ).toBeVisible()
  await expect(
    entries.filter({ hasText: 'Signed off version 1 of the analysis (fingerprint ' }).first(),
  ).toBeVisible()
  await expect(pi.getByTestId('audit-table')).not.toContainText('share_link.created')
  await attachScreenshot(pi, testInfo, 'PI: the audit log in sentences')
  await pi.goBack()

  // A collaborator without an account opens the link.
  const guestContext = await browser.newContext()
  const guest = await guestContext.newPage()
  await guest.goto(url!.trim())
  // The first page load of a fresh browser fetches the chart code too: allow for a busy machine.
  await expect(guest.getByTestId('shared-name')).toHaveText(ANALYSIS, { timeout: 90_000 })
  await expect(guest.getByTestId('shared-facts')).toContainText('signed off by a biostatistician')
  await expect(guest.getByText('Comparisons', { exact: true })).toBeVisible()
  await expect(guest.getByTestId('main-nav')).toHaveCount(0)
  await expect(guest.getByTestId('review-panel')).toHaveCount(0)
  await expect(guest.getByTestId('shared-units-csv')).toHaveCount(0)
  await attachScreenshot(guest, testInfo, 'guest: the shared result, read-only')
  // Nothing else is reachable: the rest of the app asks for a sign-in.
  await guest.goto('/analyses')
  await expect(guest).toHaveURL(/\/sign-in/)
  const api = await guest.request.get('/api/v1/analyses')
  expect(api.status()).toBe(401)

  // The PI sees that it was opened.
  await pi.reload()
  await expect(pi.getByTestId('share-open-count').first()).toContainText('1×', { timeout: 90_000 })
  await guestContext.close()
  await piContext.close()
})
