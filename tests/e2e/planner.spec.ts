import { expect, test } from '@playwright/test'
import { attachScreenshot, demoAnalysis, signIn } from './support/demo'

// This machine is shared with other test runs: give the bundle and the server time.
test.setTimeout(180_000)

test('a PI plans the next experiment from the single-lab demo analysis and saves the plan', async ({
  page,
}, testInfo) => {
  await page.goto('/')
  await signIn(page, 'petra@example.org')
  await expect(page.getByTestId('nav-planner')).toBeVisible({ timeout: 30_000 })
  const { id } = await demoAnalysis(page, 'Neurite length, NW-117 vs vehicle')

  // From the result page: its "Plan the next experiment" button opens the planner on this version.
  await page.goto(`/analyses/${id}`)
  await page.getByTestId('plan-next').click({ timeout: 30_000 })
  await expect(page).toHaveURL(new RegExp(`/planner\\?analysisId=${id}&versionNo=1$`))
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Plan an experiment', { timeout: 30_000 })
  await expect(page.getByTestId('plan-source')).toContainText('Neurite length, NW-117 vs vehicle')
  await expect(page.getByTestId('plan-source')).toContainText('ICC of the mice')
  // No difference is filled in from the analysis: the planner asks for the one that matters, and
  // shows the observed one beside the field as a reference only.
  const difference = page.getByTestId('input-difference').locator('input')
  await expect(difference).toHaveValue('')
  await expect(page.getByTestId('plan-needs-difference')).toBeVisible()
  await expect(page.getByTestId('observed-reference')).toContainText('NW-117 − vehicle')
  await expect(page.getByTestId('plan-units')).toHaveCount(0)
  // No costs either: the plan counts mice until someone enters a cost.
  await expect(page.getByTestId('input-cost-unit').locator('input')).toHaveValue('')
  await difference.fill('15')
  const units = page.getByTestId('plan-units')
  await expect(units).toHaveText(/^\d+$/)
  await expect(page.getByTestId('plan-power-chart')).toHaveAttribute('data-chart-ready', 'true')
  await expect(page.getByTestId('plan-obs-chart')).toHaveAttribute('data-chart-ready', 'true')
  await expect(page.getByTestId('plan-cautions')).toContainText('The numbers come from 5 mice per arm')
  await expect(page.getByTestId('plan-table').locator('tbody tr')).not.toHaveCount(0)
  await expect(page.getByTestId('plan-sentence')).toContainText('The design with the fewest mice')
  await expect(page.getByTestId('plan-cost')).toHaveText(/^\d+$/)
  await attachScreenshot(page, testInfo, 'planner-from-analysis')

  // A larger difference that matters needs fewer mice.
  const before = Number(await units.textContent())
  await difference.fill('45')
  await expect.poll(async () => Number(await units.textContent())).toBeLessThan(before)
  // With costs, the cheapest design instead.
  await page.getByTestId('input-cost-unit').locator('input').fill('400')
  await page.getByTestId('input-cost-obs').locator('input').fill('3')
  await expect(page.getByTestId('plan-sentence')).toContainText('The cheapest design')

  await page.getByTestId('plan-name').locator('input').fill('Next outgrowth run (e2e)')
  await page.getByTestId('plan-save-button').click()
  await expect(page).toHaveURL(/\/plans\/\d+$/)
  // Just saved: the form shows exactly the saved numbers.
  await expect(page.getByText('The numbers above differ from the saved ones')).toHaveCount(0)
  await expect(page.getByTestId('saved-plans')).toContainText('Next outgrowth run (e2e)')
  await expect(page.getByTestId('saved-plans')).toContainText('NW-117 outgrowth')
  await attachScreenshot(page, testInfo, 'planner-saved')
})

test('typed-in numbers: the clusterPower worked example gives 16 units per arm with 10 observations each', async ({
  page,
}, testInfo) => {
  await page.goto('/')
  await signIn(page, 'sami@example.org')
  await page.getByTestId('nav-planner').click()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Plan an experiment', { timeout: 30_000 })
  // clusterPower (R) crtpwr.2mean documentation: m = 10, d = 1, ICC 0.1, σ² = 5 → 15.93 clusters per arm.
  await page.getByTestId('input-icc').locator('input').fill('0.1')
  await page
    .getByTestId('input-sd-total')
    .locator('input')
    .fill(String(Math.sqrt(5)))
  await page.getByTestId('input-difference').locator('input').fill('1')
  await page.getByTestId('input-cost-unit').locator('input').fill('1000')
  await page.getByTestId('input-cost-obs').locator('input').fill('1')
  await page.getByTestId('input-max-obs').locator('input').fill('10')
  await expect(page.getByTestId('plan-obs')).toHaveText('10')
  await expect(page.getByTestId('plan-units')).toHaveText('16')
  await expect(page.getByTestId('plan-power-chart')).toHaveAttribute('data-chart-ready', 'true')
  await attachScreenshot(page, testInfo, 'planner-typed-in')
})
