import { expect, test, type Page } from '@playwright/test'
import { signIn, writeHeaders } from './support/demo'

// Labels from an uploaded table reach chart tooltips: they must show as text, never become
// elements, also for someone who only has a read-only link.
test.setTimeout(240_000)

const MARKUP = '<img src=x>'

/** Invented: 2 labs whose names, and 3 mice per arm in each whose labels, carry markup. */
function tableWithMarkup(): string {
  const lines = ['lab,mouse,treatment,cell,neurite_length_um']
  for (const [l, lab] of [`Nimbus ${MARKUP}`, 'Fernhill'].entries())
    for (let m = 1; m <= 6; m++) {
      const treatment = m % 2 ? 'vehicle' : 'NW-117'
      for (let c = 1; c <= 5; c++) {
        const y = 100 + l * 4 + m + (m % 2 ? 0 : 6) + c * 1.5
        lines.push([`"${lab}"`, `"m${m} ${MARKUP}"`, treatment, c, y.toFixed(1)].join(','))
      }
    }
  return lines.join('\n') + '\n'
}

async function api<T>(page: Page, method: 'post' | 'put', path: string, data: object, status: number) {
  const res = await page.request[method](path, { headers: writeHeaders(page), data })
  expect(res.status(), await res.text()).toBe(status)
  return ((await res.json()) as { data: T }).data
}

test('labels with markup in a shared chart’s tooltip stay text', async ({ page, browser }) => {
  await page.goto('/sign-in')
  await signIn(page, 'sami@example.org')
  await expect(page.getByTestId('nav-overview')).toBeVisible({ timeout: 30_000 })

  const created = await page.request.post('/api/v1/datasets', {
    headers: writeHeaders(page),
    multipart: {
      labId: '1',
      projectName: 'Markup labels',
      name: 'Labels with markup (e2e)',
      file: { name: 'markup-labels.csv', mimeType: 'text/csv', buffer: Buffer.from(tableWithMarkup()) },
    },
  })
  expect(created.status(), await created.text()).toBe(201)
  const dataset = ((await created.json()) as { data: { id: number } }).data
  await api(
    page,
    'put',
    `/api/v1/datasets/${dataset.id}/versions/1/tagging`,
    {
      responseColumns: ['neurite_length_um'],
      conditionColumn: 'treatment',
      levels: ['lab', 'mouse'],
    },
    200,
  )
  const analysis = await api<{ id: number }>(
    page,
    'post',
    '/api/v1/analyses',
    {
      datasetId: dataset.id,
      name: 'Markup labels (e2e)',
    },
    201,
  )
  await expect
    .poll(
      async () => {
        const res = await page.request.get(`/api/v1/analyses/${analysis.id}/versions/1/status`)
        return ((await res.json()) as { data: { status: string } }).data.status
      },
      { timeout: 120_000 },
    )
    .toBe('done')

  // Sami created the analysis, so Sami may share it.
  const link = await api<{ url: string }>(
    page,
    'post',
    `/api/v1/analyses/${analysis.id}/share-links`,
    {
      versionNo: 1,
      allowUnitTable: true,
    },
    201,
  )

  const guestContext = await browser.newContext()
  const guest = await guestContext.newPage()
  await guest.goto(new URL(link.url).pathname)
  await expect(guest.getByTestId('shared-name')).toHaveText('Markup labels (e2e)', { timeout: 90_000 })
  const chart = guest.getByTestId('main-chart')
  await expect(chart).toHaveAttribute('data-chart-ready', 'true', { timeout: 60_000 })
  await chart.scrollIntoViewIfNeeded()

  // The first mouse of the first lab in the first condition sits at a known x: scan down its column
  // until the tooltip opens (layout of placeUnits: 6 mice in 2 labs, a gap between labs).
  const canvas = chart.locator('canvas').first()
  const box = (await canvas.boundingBox())!
  const plotLeft = box.x + 64
  const plotWidth = box.width - 64 - 24
  const firstUnit = -0.34 + (0.5 / 6.6) * 0.38
  const x = plotLeft + ((firstUnit + 0.5) / 2) * plotWidth
  const tooltip = chart.locator('div[style*="z-index: 9999999"]')
  let found = false
  for (let y = box.y + 60; y < box.y + box.height - 48 && !found; y += 3) {
    await guest.mouse.move(x, y)
    found =
      (await tooltip.count()) > 0 &&
      (await tooltip.first().isVisible()) &&
      /m\d/.test(await tooltip.first().innerText())
  }
  expect(found, 'a tooltip opened over the first mouse').toBe(true)
  // The label is in the tooltip as text; no element was made of it anywhere on the page.
  await expect(tooltip.first()).toContainText(MARKUP)
  expect(await guest.locator('img[src="x"]').count()).toBe(0)
  expect(await chart.locator('img').count()).toBe(0)
  // The unit table is shared, so "Check in R" is offered: the script refits the stored model.
  await guest.getByTestId('r-export').click()
  const scriptHref = await guest.getByTestId('r-export-script').getAttribute('href')
  const script = await guest.request.get(scriptHref!)
  expect(script.status()).toBe(200)
  expect(await script.text()).toContain('model <- lmer(neurite_length_um ~ treatment')
  await guest.keyboard.press('Escape')
  // The legend and the key name the lab as it was written.
  await expect(guest.getByTestId('unit-key')).toContainText(`Nimbus ${MARKUP}`)
  await guestContext.close()
})
