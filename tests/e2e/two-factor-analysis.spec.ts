import { readFileSync } from 'node:fs'
import { expect, test, type Page } from '@playwright/test'
import { attachScreenshot, signIn, uploadCsv } from './support/demo'
import { generator } from './support/generator'

/**
 * A genotype × treatment design from upload to result, as the demo scientist does it: upload an
 * invented three-lab table, take the suggested nesting, start an analysis with both condition
 * columns and a covariate, and read the interaction chart, the tests of each term and the model's
 * formula; the unit table has one column per factor.
 */

const LABS = ['nimbus', 'corvid', 'aster']
const GENOTYPES = ['WT', 'KO']
const TREATMENTS = ['vehicle', 'KX-9']

/**
 * An invented table: 3 labs × 8 mice (2 per genotype × treatment cell in each lab) × 6 neurons.
 * Each mouse carries one design cell; soma area is measured per neuron. Obviously fictional.
 */
function inventedCsv(): string {
  const random = generator(20240611)
  const noise = (sd: number) => (random() + random() + random() - 1.5) * sd * 2
  const lines = ['lab,mouse,genotype,treatment,neurite_length_um,soma_area_um2']
  LABS.forEach((lab, l) => {
    let mouse = 0
    for (const [g, genotype] of GENOTYPES.entries())
      for (const [t, treatment] of TREATMENTS.entries())
        for (let rep = 0; rep < 2; rep++) {
          mouse++
          const mouseShift = noise(8)
          for (let neuron = 0; neuron < 6; neuron++) {
            const soma = 200 + noise(30)
            const length = 120 + 6 * l - 12 * g + 10 * t + mouseShift + 0.2 * (soma - 200) + noise(15)
            lines.push(
              [lab, `${lab}-m${mouse}`, genotype, treatment, length.toFixed(1), soma.toFixed(1)].join(','),
            )
          }
        }
  })
  return lines.join('\n') + '\n'
}

/** Adds each of `names` to a multiple select unless it is already chosen (its chip is shown). */
async function choose(page: Page, field: string, names: string[]): Promise<void> {
  for (const name of names) {
    const chip = page.getByTestId(field).locator('.v-chip', { hasText: name })
    if ((await chip.count()) > 0) continue
    await page.getByTestId(field).click()
    await page.getByRole('option', { name, exact: true }).click()
    await page.keyboard.press('Escape')
    await expect(chip).toHaveCount(1)
  }
}

test('a scientist analyses a genotype × treatment table with a covariate', async ({ page }, testInfo) => {
  test.setTimeout(240_000)
  const datasetName = `Genotype × treatment neurites ${Date.now()}`

  await page.goto('/sign-in')
  await signIn(page, 'sami@example.org')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Sami')
  await uploadCsv(page, {
    project: 'Neurite pilot',
    file: 'neurites-genotype-treatment.csv',
    csv: inventedCsv(),
    name: datasetName,
  })

  // Take the suggested nesting; rows are listed by treatment within lab, so the suggestion may
  // nest mice in treatments, and a scientist takes a condition out of the levels: lab › mouse.
  await expect(page).toHaveURL(/\/datasets\/\d+\?tab=nesting$/, { timeout: 60_000 })
  await page.getByTestId('use-suggestion').click()
  const levels = page.getByTestId('nesting-level')
  for (const condition of ['genotype', 'treatment']) {
    const level = page.locator(`[data-testid="nesting-level"][data-level="${condition}"]`)
    if ((await level.count()) > 0) await level.getByTestId('level-remove').click()
  }
  await expect(levels).toHaveCount(2)
  await expect(levels.nth(0)).toHaveAttribute('data-level', 'lab')
  await expect(levels.nth(1)).toHaveAttribute('data-level', 'mouse')
  await page.getByTestId('nesting-save').click()
  await expect(page.getByTestId('nesting-status')).toHaveText('Nesting saved')

  // Both condition columns, the covariate, and the reference of each factor.
  await page.getByTestId('new-analysis').click()
  await expect(page.getByTestId('analysis-settings')).toBeVisible()
  await page.getByTestId('analysis-name').locator('input').fill('Genotype × treatment, soma-adjusted')
  await choose(page, 'setting-conditions', ['genotype', 'treatment'])
  await expect(page.getByTestId('setting-reference')).toHaveCount(2)
  await choose(page, 'setting-covariates', ['soma_area_um2'])
  await attachScreenshot(page, testInfo, 'settings with two conditions and a covariate')
  await page.getByTestId('run-analysis').click()

  await expect(page).toHaveURL(/\/analyses\/\d+/, { timeout: 30_000 })
  await expect(page.locator('[data-testid="main-chart"][data-chart-ready="true"]')).toBeVisible({
    timeout: 60_000,
  })

  // The interaction chart: one line per treatment, drawn.
  await expect(page.locator('[data-testid="interaction-chart"][data-chart-ready="true"]')).toBeVisible()
  await expect(page.getByTestId('interaction-section')).toContainText('combine')

  // The type III tests: both factors, their interaction and the covariate.
  const terms = page.getByTestId('terms-table')
  await expect(terms).toBeVisible()
  for (const term of ['genotype', 'treatment', 'soma_area_um2'])
    await expect(terms.getByRole('cell', { name: term, exact: true })).toBeVisible()
  await expect(terms).toContainText('(interaction)')

  // The model, in lme4 notation, with the maximal nested random part.
  const formula = page.getByTestId('model-formula')
  await expect(formula).toContainText(/neurite_length_um ~ (genotype \* treatment|treatment \* genotype)/)
  await expect(formula).toContainText('soma_area_um2')
  await expect(formula).toContainText('(1|lab:treatment)')
  await expect(page.getByTestId('model-reading')).toContainText('In words:')
  await expect(page.getByTestId('coefficients-table')).toContainText('soma_area_um2')
  await attachScreenshot(page, testInfo, 'two-factor result')

  // The unit table: one column per factor instead of one condition column.
  const [csv] = await Promise.all([page.waitForEvent('download'), page.getByTestId('units-csv').click()])
  const header = readFileSync(await csv.path(), 'utf8')
    .replace(/^\uFEFF/, '')
    .split(/\r?\n/)[0]
  expect(header).toMatch(/^level,unit,(genotype,treatment|treatment,genotype),n,mean,sd$/)
})
