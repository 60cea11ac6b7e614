import { expect, test, type Page } from '@playwright/test'
import { attachScreenshot, demoAnalysis, signIn } from './support/demo'

// This machine is shared with other test runs: give the bundle and the server time.
test.setTimeout(180_000)

const input = (page: Page, testid: string) => page.getByTestId(testid).locator('input')

test('typed-in numbers over labs: more mice cannot beat lab-to-lab differences, more labs can', async ({
  page,
}, testInfo) => {
  await page.goto('/')
  await signIn(page, 'sami@example.org')
  await page.getByTestId('nav-planner').click()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Plan an experiment', { timeout: 30_000 })

  // Invented numbers: SD √120 ≈ 10.95 inside a lab and arm, ICC 1/6, a difference of 6 worth detecting.
  await input(page, 'input-icc').fill('0.1667')
  await input(page, 'input-sd-total').fill('10.95')
  await input(page, 'input-difference').fill('6')
  await input(page, 'input-labs-max').fill('4')
  await input(page, 'input-labs-min').fill('4')
  // Invented costs: a lab 2000, a mouse 100, a cell 1 (without them the plan counts mice instead).
  await input(page, 'input-cost-lab').fill('2000')
  await input(page, 'input-cost-unit').fill('100')
  await input(page, 'input-cost-obs').fill('1')
  await expect(page.getByTestId('plan-labs')).toHaveText('4')

  // Not yet known how much labs differ: planned as 0, with a visible caution.
  await expect(page.getByTestId('plan-effect-sd-unknown')).toContainText('That is optimistic')
  await expect(page.getByTestId('plan-ceiling')).toContainText('nothing caps the power')

  // Labs differ in their response (SD of the effect 4): with 4 labs no number of units gets there.
  await input(page, 'input-effect-sd').fill('4')
  await expect(page.getByTestId('plan-effect-sd-unknown')).toHaveCount(0)
  await expect(page.getByTestId('plan-ceiling')).toHaveText(
    /^With 4 labs, no number of units reaches more than \d+ % power: labs differ in how strongly they respond\. It takes at least \d+ labs to reach 80 %\.$/,
  )
  await expect(page.getByTestId('plan-sentence')).toContainText(
    'No design within your limits reaches the target power',
  )
  await expect(page.getByTestId('plan-labs-chart')).toHaveAttribute('data-chart-ready', 'true')
  const fewest = Number(
    (await page.getByTestId('plan-ceiling').textContent())!.match(/at least (\d+) labs/)![1],
  )
  expect(fewest).toBeGreaterThan(4)
  await attachScreenshot(page, testInfo, 'planner: the ceiling with 4 labs')

  // Allow up to 20 labs: the plan reaches the target with at least that many labs.
  await input(page, 'input-labs-max').fill('20')
  await expect(page.getByTestId('plan-sentence')).toContainText(
    'The cheapest design that reaches 80 % power runs',
  )
  await expect
    .poll(async () => Number(await page.getByTestId('plan-labs').textContent()))
    .toBeGreaterThanOrEqual(fewest)
  await page.getByTestId('labs-axis-obs').click()
  await expect(page.getByTestId('plan-labs-chart')).toHaveAttribute('data-chart-ready', 'true')
  await expect(page.getByTestId('plan-table').locator('thead')).toContainText('labs')
  const labs = await page.getByTestId('plan-labs').textContent()
  await attachScreenshot(page, testInfo, 'planner: labs chart against observations per unit')

  await page.getByTestId('plan-name').locator('input').fill('Consortium follow-up (e2e)')
  await page.getByTestId('plan-save-button').click()
  await expect(page).toHaveURL(/\/plans\/\d+$/)
  await expect(page.getByText('The numbers above differ from the saved ones')).toHaveCount(0)
  const row = page.getByTestId('saved-plans').locator('tr', { hasText: 'Consortium follow-up (e2e)' })
  await expect(row).toContainText(`${labs} labs`)
})

test('from the three-lab demo analysis: the labs come from the data, the effect SD between them is asked for', async ({
  page,
}, testInfo) => {
  await page.goto('/')
  await signIn(page, 'petra@example.org')
  await expect(page.getByTestId('nav-planner')).toBeVisible({ timeout: 30_000 })
  const { id } = await demoAnalysis(page, 'Neurite length across three labs')
  const version = await page.request.get(`/api/v1/analyses/${id}/versions/1`)
  const { result } = (await version.json()).data as { result: { conditionLevel: string | null } | null }
  // While the engine and its settings are being reworked (issue 12) the seeded analysis may come
  // out without its condition; the planner then has no labs to start from and this test says so.
  test.skip(
    result?.conditionLevel !== 'mouse',
    `the seeded three-lab analysis has no treatment between mice (conditionLevel ${String(result?.conditionLevel)})`,
  )
  await page.goto(`/planner?analysisId=${id}&versionNo=1`)
  await expect(page.getByTestId('plan-source')).toContainText('with its 3 labs', { timeout: 30_000 })
  // The planner asks for the difference that matters before it shows a plan.
  await expect(page.getByTestId('plan-needs-difference')).toBeVisible()
  await input(page, 'input-difference').fill('10')
  await expect(page.getByTestId('plan-labs')).toHaveText('3')
  await expect(input(page, 'input-outer-name')).toHaveValue('lab')
  // An analysis without a lab × treatment term (engine 0.1) leaves it unknown: the form asks, the result warns.
  const effect = input(page, 'input-effect-sd')
  if ((await effect.inputValue()) === '') {
    await expect(page.getByTestId('plan-effect-sd-unknown')).toBeVisible()
    await expect(page.getByTestId('plan-source-mapping')).toContainText(
      'did not estimate how much the effect differs between labs',
    )
  }
  await effect.fill('20')
  await expect(page.getByTestId('plan-ceiling')).toContainText('no number of mice reaches more than')
  await expect(page.getByTestId('plan-labs-chart')).toHaveAttribute('data-chart-ready', 'true')
  await attachScreenshot(page, testInfo, 'planner: from the three-lab analysis')
})
