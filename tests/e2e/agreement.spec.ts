import { expect, test } from '@playwright/test'
import { attachScreenshot, demoAnalysis, signIn } from './support/demo'

// This machine is shared with other test runs: give the bundle and the server time.
test.setTimeout(180_000)

test('the consortium lead sees which lab disagrees, in spread or effect', async ({ page }, testInfo) => {
  await page.goto('/')
  await signIn(page, 'petra@example.org')
  await expect(page.getByTestId('nav-overview')).toBeVisible({ timeout: 30_000 })
  const analysis = await demoAnalysis(page, 'Neurite length across three labs')

  // The result page offers the agreement page because the outermost level has 3 units.
  await page.goto(`/analyses/${analysis.id}`)
  // The tab says which analysis it is; the button names the level as the data do.
  await expect(page).toHaveTitle('Neurite length across three labs · Nestwise', { timeout: 30_000 })
  await expect(page.getByTestId('agreement-link')).toHaveText('Agreement between units of “lab”')
  await page.getByTestId('agreement-link').click({ timeout: 30_000 })
  await expect(page).toHaveURL(new RegExp(`/analyses/${analysis.id}/versions/1/agreement$`))
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Agreement between the units of “lab”', {
    timeout: 30_000,
  })
  // Invented demo data, flag expected by construction: Larkspur's neurons vary twice as much.
  await expect(page.getByTestId('agreement-findings')).toContainText(
    "Larkspur's spread between observations inside a unit is unusually large",
  )
  for (const lab of ['Nimbus', 'Fernhill', 'Larkspur']) {
    await expect(page.getByTestId(`agreement-lab-${lab}`)).toContainText('6')
  }
  await expect(page.getByTestId('precision-sr')).toBeVisible()
  await expect(page.getByTestId('precision-R')).toBeVisible()
  for (const chart of ['mandel-h-chart', 'mandel-k-within-chart', 'mandel-k-between-chart']) {
    await expect(page.getByTestId(chart)).toHaveAttribute('data-chart-ready', 'true')
  }
  await expect(page.getByTestId('agreement-tests')).toContainText('outlier (1 %)')
  await expect(page.getByTestId('agreement-effects').locator('tbody tr')).toHaveCount(3)
  await expect(page.getByTestId('agreement-interaction')).toContainText('lab × condition')
  await attachScreenshot(page, testInfo, 'agreement-consortium')

  await page.getByTestId('agreement-plan-link').click()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Plan an experiment', { timeout: 30_000 })
  await expect(page.getByTestId('plan-source')).toContainText('Neurite length across three labs')
})

test('a single-lab analysis says plainly why there is no agreement view', async ({ page }, testInfo) => {
  await page.goto('/')
  await signIn(page, 'sami@example.org')
  await expect(page.getByTestId('nav-overview')).toBeVisible({ timeout: 30_000 })
  const single = await demoAnalysis(page, 'Neurite length, NW-117 vs vehicle')
  await page.goto(`/analyses/${single.id}/versions/1/agreement`)
  await expect(page.getByTestId('error-notice')).toContainText('level inside the outermost one')
  await attachScreenshot(page, testInfo, 'agreement-not-available')
})
