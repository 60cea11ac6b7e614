import { readFileSync } from 'node:fs'
import { expect, test, type Page } from '@playwright/test'
import { attachScreenshot, signIn } from './support/demo'

/**
 * The analysis workspace as a scientist uses it: the seeded single-lab analysis (5 mice per arm,
 * where the naive test looks significant and the nested one does not), its badges, error-bar types,
 * exports and printable report; then a new analysis on another demo dataset, run from the button.
 */

const SINGLE_LAB = 'Neurite length, NW-117 vs vehicle'

async function signInAsScientist(page: Page): Promise<void> {
  await page.goto('/sign-in')
  await signIn(page, 'sami@example.org')
  await expect(page).not.toHaveURL(/sign-in/)
}

async function mainChartDrawn(page: Page): Promise<void> {
  await expect(page.locator('[data-testid="main-chart"][data-chart-ready="true"]')).toBeVisible({
    timeout: 30_000,
  })
}

test('reads the seeded single-lab analysis, switches error bars, exports and prints', async ({
  page,
}, testInfo) => {
  // Full-page screenshots and downloads are slow on a busy two-core machine.
  test.setTimeout(180_000)
  await signInAsScientist(page)
  await page.getByTestId('nav-analyses').click()
  await page.getByText(SINGLE_LAB).click()
  await mainChartDrawn(page)

  // Seed: 5 mice per arm, so the units badge is amber ("few") and shows the per-arm numbers.
  const units = page.getByTestId('badge-units-mouse')
  await expect(units).toHaveAttribute('data-adequacy', 'thin')
  await expect(units).toContainText('10')
  await expect(units).toContainText('5 vehicle · 5 NW-117')
  await expect(page.getByTestId('badge-observations')).toContainText('observations')
  await expect(page.getByTestId('badge-effective-n')).toContainText('effective n')
  await expect(page.getByTestId('badge-design-effect')).toContainText('design effect')

  // The naive row is struck through with its reason; the model row is not.
  await expect(page.getByTestId('comparison-naive')).toHaveClass(/row--wrong/)
  await expect(page.getByTestId('naive-reason')).toContainText('as independent')
  await expect(page.getByTestId('report-methods')).toContainText('units of “mouse”')
  await attachScreenshot(page, testInfo, 'result-sem')

  for (const [type, words] of [
    ['sd', 'standard deviation'],
    ['ci95', '95% confidence interval'],
    ['sem', 'standard error'],
  ] as const) {
    await page.getByTestId(`error-bar-${type}`).click()
    await expect(page.getByTestId('main-chart-key')).toContainText(words)
  }
  await page.getByTestId('error-bar-ci95').click()
  await attachScreenshot(page, testInfo, 'result-ci95')

  const [png] = await Promise.all([page.waitForEvent('download'), page.getByTestId('main-chart-png').click()])
  expect(png.suggestedFilename()).toMatch(/\.png$/)
  const pngBytes = readFileSync(await png.path())
  expect(pngBytes.subarray(1, 4).toString()).toBe('PNG')

  const [svg] = await Promise.all([
    page.waitForEvent('download'),
    page.getByTestId('variance-chart-svg').click(),
  ])
  expect(svg.suggestedFilename()).toMatch(/\.svg$/)
  expect(readFileSync(await svg.path(), 'utf8')).toContain('<svg')

  const [csv] = await Promise.all([page.waitForEvent('download'), page.getByTestId('units-csv').click()])
  // The server starts the file with a byte-order mark so spreadsheets read it as UTF-8.
  const csvText = readFileSync(await csv.path(), 'utf8').replace(/^\uFEFF/, '')
  expect(csvText.split(/\r?\n/)[0]).toBe('level,unit,condition,n,mean,sd')
  // One row per mouse: 10 mice in the seed.
  expect(csvText.trim().split(/\r?\n/)).toHaveLength(11)

  await page.getByTestId('print-view').click()
  await expect(page.getByTestId('print-page')).toBeVisible()
  // The printed report shows the bar chosen on the result page, and says which.
  await expect(page).toHaveURL(/bars=ci95/)
  await expect(page.getByTestId('print-error-bars')).toContainText('95% CI')
  await mainChartDrawn(page)
  await expect(page.getByTestId('report-results')).toContainText('Satterthwaite')
  await page.emulateMedia({ media: 'print' })
  await expect(page.getByTestId('print-button')).toBeHidden()
  await attachScreenshot(page, testInfo, 'print-view')
})

test('creates a new analysis on a demo dataset and sees it finish', async ({ page }, testInfo) => {
  test.setTimeout(180_000)
  await signInAsScientist(page)
  await page.getByRole('link', { name: 'Datasets' }).click()
  await page.getByRole('link', { name: 'Consortium outgrowth, three labs' }).first().click()
  await page.getByTestId('new-analysis').click()
  await expect(page.getByTestId('analysis-settings')).toBeVisible()
  await page.getByTestId('analysis-name').locator('input').fill('Three labs, second look')
  await attachScreenshot(page, testInfo, 'new-analysis-form')
  await page.getByTestId('run-analysis').click()

  // The result page's chunk (with echarts) loads before the address changes.
  await expect(page).toHaveURL(/\/analyses\/\d+/, { timeout: 30_000 })
  await expect(page.getByTestId('analysis-name')).toHaveText('Three labs, second look')
  await mainChartDrawn(page)
  await expect(page.getByTestId('result-badges')).toBeVisible()
  await attachScreenshot(page, testInfo, 'new-analysis-result')

  // New settings make version 2; version 1 stays readable.
  await page.getByTestId('change-settings').click()
  // The error bar is a viewer's preference now, not a setting: turn on the bootstrap instead.
  await page.getByRole('dialog').getByTestId('setting-bootstrap').locator('input').click()
  await page.getByTestId('run-new-version').click()
  await expect(page.getByTestId('version-picker')).toContainText('Version 2', { timeout: 30_000 })
  await mainChartDrawn(page)
  await page.getByTestId('version-picker').click()
  await page.getByRole('option', { name: /Version 1/ }).click()
  await expect(page.getByTestId('older-version')).toBeVisible()
  await mainChartDrawn(page)
})
