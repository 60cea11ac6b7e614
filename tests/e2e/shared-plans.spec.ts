import { expect, test, type Page } from '@playwright/test'
import { attachScreenshot, demoAnalysis, signIn, writeHeaders } from './support/demo'

// This machine is shared with other test runs: give the bundle and the server time.
test.setTimeout(180_000)

const ANALYSIS = 'Neurite length, NW-117 vs vehicle'
const PLAN = 'Plan on the shared link (e2e)'

/** Writes through the API with the browser's session, as the app does (same origin, marker header). */
async function post<T>(page: Page, path: string, body: object): Promise<T> {
  const res = await page.request.post(path, {
    headers: writeHeaders(page),
    data: body,
  })
  expect(res.status(), await res.text()).toBe(201)
  return ((await res.json()) as { data: T }).data
}

test('a saved plan shows on the read-only link and in the printed report', async ({
  page,
  browser,
}, testInfo) => {
  await page.goto('/sign-in')
  await signIn(page, 'petra@example.org')
  await expect(page.getByTestId('nav-planner')).toBeVisible({ timeout: 30_000 })
  const analysis = await demoAnalysis(page, ANALYSIS)

  // A plan from version 1 with the numbers the planner suggests, then a link to that version.
  const defaults = await page.request.get(`/api/v1/plans/defaults?analysisId=${analysis.id}&versionNo=1`)
  expect(defaults.ok()).toBe(true)
  const { inputs } = ((await defaults.json()) as { data: { inputs: object } }).data
  const plan = await post<{ result: { unitsPerArm: number; obsPerUnit: number } }>(page, '/api/v1/plans', {
    labId: analysis.labId,
    name: PLAN,
    source: { analysisId: analysis.id, versionNo: 1 },
    // The suggestion leaves the difference to the person planning: an invented 15 µm here.
    inputs: { ...inputs, difference: 15 },
  })
  const link = await post<{ url: string }>(page, `/api/v1/analyses/${analysis.id}/share-links`, {
    versionNo: 1,
  })

  // Someone without an account opens the link.
  const guestContext = await browser.newContext()
  const guest = await guestContext.newPage()
  await guest.goto(new URL(link.url).pathname)
  await expect(guest.getByTestId('shared-name')).toHaveText(ANALYSIS, { timeout: 90_000 })
  const shared = guest.getByTestId('plan-summary')
  await expect(shared.getByRole('heading', { name: 'Plans for the next experiment' })).toBeVisible()
  const row = shared.getByTestId('plan-summary-row').filter({ hasText: PLAN })
  await expect(row).toHaveCount(1)
  await expect(row.getByTestId('plan-summary-units')).toHaveText(String(plan.result.unitsPerArm))
  await expect(row.getByTestId('plan-summary-obs')).toHaveText(String(plan.result.obsPerUnit))
  await expect(row).toContainText('ICC')
  await expect(shared.locator('thead')).toContainText('Mice per arm')
  // The seeded demo plan of the same version is there too.
  await expect(shared).toContainText('Follow-up outgrowth run, NW-117 vs vehicle')
  await expect(shared.locator('button, a, input')).toHaveCount(0)
  await shared.scrollIntoViewIfNeeded()
  await attachScreenshot(guest, testInfo, 'guest: plans on the read-only link')
  await guestContext.close()

  // The printed report of the same version lists the same plans, without buttons on paper.
  await page.goto(`/analyses/${analysis.id}/versions/1/print`)
  await expect(page.getByTestId('print-page')).toBeVisible({ timeout: 30_000 })
  const printed = page.getByTestId('plan-summary')
  const printedRow = printed.getByTestId('plan-summary-row').filter({ hasText: PLAN })
  await expect(printedRow).toHaveCount(1, { timeout: 30_000 })
  await expect(printedRow.getByTestId('plan-summary-units')).toHaveText(String(plan.result.unitsPerArm))
  await expect(printed).toContainText('Follow-up outgrowth run, NW-117 vs vehicle')
  await page.emulateMedia({ media: 'print' })
  await expect(page.getByTestId('print-button')).toBeHidden()
  await expect(printed).toBeVisible()
  await printed.scrollIntoViewIfNeeded()
  await attachScreenshot(page, testInfo, 'print view with plans')
})

test('a link to a version without plans shows no plans section to the reader', async ({
  page,
  browser,
}, testInfo) => {
  await page.goto('/sign-in')
  await signIn(page, 'hugo@example.org')
  await expect(page.getByTestId('nav-planner')).toBeVisible({ timeout: 30_000 })
  const analysis = await demoAnalysis(page, 'Viability by dose')
  const link = await post<{ url: string }>(page, `/api/v1/analyses/${analysis.id}/share-links`, {
    versionNo: 1,
  })
  const guestContext = await browser.newContext()
  const guest = await guestContext.newPage()
  await guest.goto(new URL(link.url).pathname)
  await expect(guest.getByTestId('shared-name')).toHaveText('Viability by dose', { timeout: 90_000 })
  await expect(guest.getByTestId('main-chart')).toHaveAttribute('data-chart-ready', 'true', {
    timeout: 60_000,
  })
  await expect(guest.getByTestId('plan-summary')).toHaveCount(0)
  await attachScreenshot(guest, testInfo, 'guest: a result without plans')
  await guestContext.close()
})
