import { expect, test, type Page } from '@playwright/test'
import { inventedNeuronRows } from '../../shared/analysis/fixtures/invented-glmm-tables'
import { attachScreenshot, signIn, uploadCsv } from './support/demo'

/**
 * A table whose only response is a yes/no written as text: the invented neurons in mice in three
 * fictional labs (see invented-glmm-tables.ts) without their count column, so "marker" (positive
 * or negative) is the one thing measured. The scientist tags it as the response in the nesting
 * editor, which says it is analysed as yes/no and which value counts as yes; the new analysis
 * starts as binomial and the result reads as an odds ratio.
 */
function yesNoOnlyCsv(): string {
  const lines = inventedNeuronRows().map((r) => [r.lab, r.mouse, r.treatment, r.neuron, r.marker].join(','))
  return ['lab,mouse,treatment,neuron,marker', ...lines].join('\n') + '\n'
}

const HINT = 'two values: analysed as yes/no (counted as yes: positive)'

/** Picks one value of a select whose options may carry a subtitle. */
async function pick(page: Page, field: string, name: string): Promise<void> {
  await page.getByTestId(field).click()
  await page
    .getByRole('option')
    .filter({ hasText: new RegExp(`^${name}`) })
    .click()
  await page.keyboard.press('Escape')
  await expect(page.getByRole('listbox')).toHaveCount(0)
}

test('a scientist tags a yes/no text column as the response and reads the odds ratio', async ({
  page,
}, testInfo) => {
  test.setTimeout(240_000)
  const datasetName = `Marker only ${Date.now()}`

  await page.goto('/sign-in')
  await signIn(page, 'sami@example.org')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Sami')
  await uploadCsv(page, {
    project: 'Marker pilot',
    file: 'marker-only.csv',
    csv: yesNoOnlyCsv(),
    name: datasetName,
  })
  await expect(page).toHaveURL(/\/datasets\/\d+\?tab=nesting$/, { timeout: 60_000 })
  await expect(page.getByTestId('nesting-status')).toHaveText('Nesting not saved yet')

  // The response by hand: the menu says how the two-valued column is read.
  await page.getByTestId('nesting-response').click()
  const option = page.getByRole('option').filter({ hasText: /^marker/ })
  await expect(option).toContainText(HINT)
  await option.click()
  await page.keyboard.press('Escape')
  await expect(page.getByRole('listbox')).toHaveCount(0)
  await expect(page.getByTestId('nesting-response')).toContainText(`marker: ${HINT}`)

  await pick(page, 'nesting-condition', 'treatment')
  await pick(page, 'level-add', 'lab')
  await pick(page, 'level-add', 'mouse')
  const levels = page.getByTestId('nesting-level')
  await expect(levels).toHaveCount(2)
  await attachScreenshot(page, testInfo, 'a yes/no text column as the response')
  await page.getByTestId('nesting-save').click()
  await expect(page.getByTestId('nesting-status')).toHaveText('Nesting saved')

  // The analysis starts from the nesting: binomial, "positive" counted as yes.
  await page.getByTestId('new-analysis').click()
  await expect(page.getByTestId('analysis-settings')).toBeVisible()
  await expect(page.getByTestId('family-binomial')).toHaveClass(/v-btn--active/)
  await expect(page.getByTestId('setting-positive')).toContainText('positive')
  await page.getByTestId('run-analysis').click()

  await expect(page).toHaveURL(/\/analyses\/\d+/, { timeout: 30_000 })
  await expect(page.locator('[data-testid="main-chart"][data-chart-ready="true"]')).toBeVisible({
    timeout: 60_000,
  })
  const row = page.getByTestId(/^comparison-model-/).first()
  await expect(row).toContainText(/(QZ-41 vs vehicle|vehicle vs QZ-41)/)
  await expect(row).toContainText(/OR \d+(\.\d+)?/)
  await expect(page.getByTestId('ratio-note')).toContainText('odds ratio (OR)')
  await expect(page.getByTestId('model-family')).toContainText('binomial(link = "logit")')
  await page.getByRole('button', { name: 'What exactly was computed' }).click()
  await expect(page.getByTestId('version-facts')).toContainText('yes = “positive”')
  await attachScreenshot(page, testInfo, 'the yes/no result from a text column')
})
