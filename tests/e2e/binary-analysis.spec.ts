import { readFileSync } from 'node:fs'
import { expect, test, type Page } from '@playwright/test'
import { attachScreenshot, signIn, uploadCsv } from './support/demo'
import { generator } from './support/generator'

/**
 * A yes/no response from upload to result, as the demo scientist does it: an invented table of
 * marker-positive neurons per mouse in three fictional labs (half the mice given the invented
 * compound QZ-41), the form suggesting the binomial family from the column's two values, the
 * scientist confirming it, and the result read as an odds ratio with the variance on the latent
 * scale.
 */

/**
 * One row per neuron: lab, mouse, treatment, marker (positive/negative), puncta. 3 labs × 8 mice
 * (the compound on every second mouse) × 20–34 neurons; a neuron is marker-positive with
 * probability logistic(−0.6 + 0.9·QZ-41 + mouse effect), a rough sum of uniforms standing in for
 * a normal mouse effect. Obviously fictional.
 */
function inventedCsv(): string {
  const random = generator(20261203)
  const noise = (sd: number) => (random() + random() + random() - 1.5) * sd * 2
  const lines = ['lab,mouse,treatment,marker,puncta']
  for (const lab of ['hollowmere', 'quillby', 'tarnwick'])
    for (let m = 1; m <= 8; m++) {
      const treated = m % 2 === 0
      const mouseEffect = noise(0.6)
      const neurons = 20 + Math.floor(random() * 15)
      for (let n = 0; n < neurons; n++) {
        const eta = -0.6 + (treated ? 0.9 : 0) + mouseEffect
        const marker = random() < 1 / (1 + Math.exp(-eta)) ? 'positive' : 'negative'
        const puncta = Math.floor(random() * 12)
        lines.push([lab, `${lab}-m${m}`, treated ? 'QZ-41' : 'vehicle', marker, puncta].join(','))
      }
    }
  return lines.join('\n') + '\n'
}

/** Picks one value of a single select. */
async function pick(page: Page, field: string, name: string): Promise<void> {
  await page.getByTestId(field).click()
  await page.getByRole('option', { name, exact: true }).click()
  await expect(page.getByRole('listbox')).toHaveCount(0)
}

/** Adds each of `names` to a multiple select. */
async function choose(page: Page, field: string, names: string[]): Promise<void> {
  for (const name of names) {
    await page.getByTestId(field).click()
    await page.getByRole('option', { name, exact: true }).click()
    await page.keyboard.press('Escape')
    await expect(page.getByTestId(field).locator('.v-chip', { hasText: name })).toHaveCount(1)
    // The next field's menu must not meet this one's options while it closes.
    await expect(page.getByRole('listbox')).toHaveCount(0)
  }
}

test('a scientist analyses marker-positive neurons as a yes/no response', async ({ page }, testInfo) => {
  test.setTimeout(240_000)
  const datasetName = `Marker-positive neurons ${Date.now()}`

  await page.goto('/sign-in')
  await signIn(page, 'sami@example.org')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Sami')
  await uploadCsv(page, {
    project: 'Marker pilot',
    file: 'marker-neurons.csv',
    csv: inventedCsv(),
    name: datasetName,
  })
  await expect(page).toHaveURL(/\/datasets\/\d+/, { timeout: 60_000 })

  // A new analysis straight away: the response, then the kind the form suggests for it.
  await page.getByTestId('new-analysis').click()
  await expect(page.getByTestId('analysis-settings')).toBeVisible()
  await page.getByTestId('analysis-name').locator('input').fill('Marker-positive neurons, QZ-41 vs vehicle')
  await pick(page, 'setting-response', 'marker')
  const suggestion = page.getByTestId('family-suggestion')
  await expect(suggestion).toHaveAttribute('data-family', 'binomial')
  await expect(suggestion).toContainText('“marker” holds two values')
  await attachScreenshot(page, testInfo, 'the suggested family')
  await page.getByTestId('accept-family').click()
  await expect(suggestion).toHaveCount(0)
  await expect(page.getByTestId('family-binomial')).toHaveClass(/v-btn--active/)
  await expect(page.getByTestId('setting-positive')).toContainText('positive')

  // The rest of the design: the compound per mouse, mice in labs.
  await choose(page, 'setting-conditions', ['treatment'])
  await choose(page, 'setting-levels', ['lab', 'mouse'])
  await page.getByTestId('run-analysis').click()

  await expect(page).toHaveURL(/\/analyses\/\d+/, { timeout: 30_000 })
  await expect(page.locator('[data-testid="main-chart"][data-chart-ready="true"]')).toBeVisible({
    timeout: 60_000,
  })

  // The comparison as an odds ratio with its interval, a z test without df.
  const row = page.getByTestId(/^comparison-model-/).first()
  await expect(row).toContainText(/(QZ-41 vs vehicle|vehicle vs QZ-41)/)
  await expect(row).toContainText(/OR \d+(\.\d+)?/)
  await expect(row).toContainText(/z = -?\d/)
  await expect(page.getByTestId('ratio-note')).toContainText('odds ratio (OR)')
  await expect(page.getByTestId('comparison-naive')).toHaveClass(/row--wrong/)
  const oddsRatio = (await row.textContent())!.match(/OR (\d+(\.\d+)?)/)![1]
  expect(Number(oddsRatio)).toBeGreaterThan(0)

  // Coefficients as Wald z, the term test as χ², and the variance on the latent scale.
  await expect(page.getByTestId('coefficients-table').locator('th', { hasText: /^z$/ })).toHaveCount(1)
  await expect(page.getByTestId('terms-table')).toContainText('χ²')
  await expect(page.getByTestId('latent-scale-note')).toContainText('latent (log-odds) scale')
  await expect(page.getByTestId('main-chart-scale')).toContainText('95% intervals on the proportion scale')
  await expect(page.getByTestId('model-family')).toContainText('binomial(link = "logit")')
  await expect(page.getByTestId('report-results')).toContainText(`odds ratio ${oddsRatio}`)
  await page.getByRole('button', { name: 'What exactly was computed' }).click()
  await expect(page.getByTestId('version-facts')).toContainText('yes = “positive”')
  await attachScreenshot(page, testInfo, 'the yes/no result')

  // The unit table gives each mouse's yes count and proportion.
  const [csv] = await Promise.all([page.waitForEvent('download'), page.getByTestId('units-csv').click()])
  const header = readFileSync(await csv.path(), 'utf8')
    .replace(/^\uFEFF/, '')
    .split(/\r?\n/)[0]
  expect(header).toBe('level,unit,condition,n,successes,trials,proportion')
})
