import { readFileSync } from 'node:fs'
import { expect, test, type Page, type TestInfo } from '@playwright/test'
import { attachScreenshot, openAccountMenu, signIn, writeHeaders } from './support/demo'

/**
 * A scientist's first dataset: upload an invented three-lab neurite table, watch both progress bars,
 * take over the suggested nesting (mouse labels m1–m4 are reused in every lab, so the nesting is only
 * implicit), page and sort the stored rows, and leave rows out with a written reason.
 */
const FIXTURE = 'tests/fixtures/e2e/neurites-three-labs.csv'

// Expected numbers are computed from the fixture itself, not typed in.
const fixtureRows = readFileSync(FIXTURE, 'utf8')
  .trim()
  .split('\n')
  .slice(1)
  .map((line) => line.split(','))
const lengths = fixtureRows.map((cells) => Number(cells[4]))
const EXCLUDE_ABOVE = 100
const longerThanLimit = lengths.filter((v) => v > EXCLUDE_ABOVE).length

async function pick(page: Page, field: string, option: string): Promise<void> {
  await page.getByTestId(field).click()
  await page.getByRole('option', { name: option, exact: true }).click()
}

/** Values of one column on the page of rows shown now. */
async function columnValues(page: Page, position: number): Promise<number[]> {
  const cells = page.getByTestId('rows-row').locator(`td:nth-child(${position + 2})`)
  return (await cells.allInnerTexts()).map(Number)
}

/** Full-page screenshot from the top, so the fixed app bar and drawer sit where a person sees them. */
async function capture(page: Page, testInfo: TestInfo, name: string): Promise<void> {
  await page.evaluate(() => window.scrollTo(0, 0))
  await attachScreenshot(page, testInfo, name)
}

async function chooseDarkTheme(page: Page): Promise<void> {
  const menu = await openAccountMenu(page)
  await menu.getByTestId('theme-switch').locator('input').click()
  await expect(page.locator('.v-application')).toHaveClass(/v-theme--nestwiseDark/)
  await page.keyboard.press('Escape')
}

test('a scientist uploads a table, takes the suggested nesting, pages and sorts the rows, and leaves rows out', async ({
  page,
}, testInfo) => {
  test.setTimeout(240_000)
  const datasetName = `Three-lab neurites ${Date.now()}`

  await page.goto('/sign-in')
  await signIn(page, 'sami@example.org')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Sami')
  await page.getByTestId('nav-datasets').click()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Datasets')
  await page.getByTestId('datasets-upload').click()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Upload a table')

  await page.getByTestId('upload-project').locator('input').fill('Neurite pilot')
  await page.getByTestId('upload-project').locator('input').press('Tab')
  await page.getByTestId('upload-file-input').setInputFiles(FIXTURE)
  await expect(page.getByTestId('chosen-file')).toHaveText('neurites-three-labs.csv')
  await expect(page.getByTestId('upload-name').locator('input')).toHaveValue('neurites-three-labs')
  await page.getByTestId('upload-name').locator('input').fill(datasetName)

  // Slow answers down so the progress can be watched: a 72-row table is stored in a blink, and the
  // upload's own answer then arrives long after the server's progress report said it was done.
  const cdp = await page.context().newCDPSession(page)
  await cdp.send('Network.enable')
  await cdp.send('Network.emulateNetworkConditions', {
    offline: false,
    latency: 0,
    uploadThroughput: -1,
    downloadThroughput: 400,
  })

  await page.getByTestId('upload-start').click()
  const progress = page.getByTestId('upload-progress')
  await expect(progress).toBeVisible()
  await expect(progress).toHaveAttribute('data-stage', /processing|done/)
  await expect(page.getByTestId('transfer-text')).toHaveText(/^\d+(\.\d)? kB sent$/)
  // The server's own progress report, polled while the request is open.
  await expect(page.getByTestId('server-text')).toContainText(`${fixtureRows.length} rows stored`)
  await capture(page, testInfo, 'upload: both progress bars')
  await cdp.send('Network.emulateNetworkConditions', {
    offline: false,
    latency: 0,
    uploadThroughput: -1,
    downloadThroughput: -1,
  })

  await expect(page).toHaveURL(/\/datasets\/\d+\?tab=nesting$/)
  await expect(page.getByTestId('dataset-name')).toHaveText(datasetName)
  await expect(page.getByTestId('dataset-place')).toHaveText('Nimbus Neurite Lab · Neurite pilot')
  await expect(page.getByTestId('nesting-status')).toHaveText('Nesting not saved yet')

  // The suggestion: lab › mouse, with the reused mouse labels called out.
  const suggestion = page.getByTestId('nesting-suggestion')
  await expect(suggestion.getByTestId('chain-level')).toHaveCount(2)
  await expect(suggestion.getByTestId('chain-level').nth(0)).toContainText('lab')
  await expect(suggestion.getByTestId('chain-level').nth(0)).toContainText('3 units')
  await expect(suggestion.getByTestId('chain-level').nth(1)).toContainText('12 units')
  await expect(suggestion.getByTestId('suggestion-reused')).toContainText('m1')
  await expect(suggestion.getByTestId('suggestion-placement')).toHaveText(
    'varies between “mouse” units, within “lab”',
  )

  await page.getByTestId('use-suggestion').click()
  const levels = page.getByTestId('nesting-level')
  await expect(levels).toHaveCount(2)
  await expect(levels.nth(0)).toHaveAttribute('data-level', 'lab')
  await expect(levels.nth(1)).toHaveAttribute('data-level', 'mouse')
  await expect(page.getByTestId('nesting-response')).toContainText('neurite_length_um')
  await expect(page.getByTestId('nesting-condition')).toContainText('condition')
  await capture(page, testInfo, 'nesting editor with the suggestion taken over')

  await page.getByTestId('nesting-save').click()
  await expect(page.getByTestId('nesting-status')).toHaveText('Nesting saved')
  // Saved as suggested: the suggestion no longer repeats what the summary below says.
  await expect(suggestion.getByTestId('suggestion-compact')).toBeVisible()
  await expect(suggestion.getByTestId('suggestion-explanation')).toHaveCount(0)
  const arms = page.getByTestId('design-arm')
  await expect(arms).toHaveCount(2)
  // Two of the four mice in each of the three labs get each condition in the fixture: 6 per arm.
  for (const arm of await arms.all()) await expect(arm).toContainText('6 units')
  await capture(page, testInfo, 'saved nesting with units per condition')

  // Rows: 25 a page, paged and sorted by the server.
  await page.getByTestId('tab-rows').click()
  const rows = page.getByTestId('rows-row')
  await expect(rows).toHaveCount(25)
  await expect(rows.first()).toHaveAttribute('data-row', '2')
  await page.getByRole('button', { name: 'Next page' }).click()
  await expect(rows.first()).toHaveAttribute('data-row', '27')

  const lengthHeader = page.getByTestId('rows-table').locator('th', { hasText: 'neurite_length_um' })
  await lengthHeader.click()
  await expect(rows.first()).toHaveAttribute('data-row', /\d+/)
  await expect(async () => {
    const ascending = await columnValues(page, 4)
    expect(ascending[0]).toBe(Math.min(...lengths))
    expect(ascending).toEqual([...ascending].sort((a, b) => a - b))
  }).toPass()
  await lengthHeader.click()
  await expect(async () => {
    const descending = await columnValues(page, 4)
    expect(descending[0]).toBe(Math.max(...lengths))
    expect(descending).toEqual([...descending].sort((a, b) => b - a))
  }).toPass()
  await capture(page, testInfo, 'rows preview sorted by neurite length, longest first')

  // Leave rows out by a rule; the reason is required.
  await page.getByTestId('tab-exclusions').click()
  await pick(page, 'exclusion-column', 'neurite_length_um')
  await pick(page, 'exclusion-operator', 'is greater than')
  await page.getByTestId('exclusion-value').locator('input').fill(String(EXCLUDE_ABOVE))
  await page.getByTestId('exclusion-add').click()
  await expect(page.getByTestId('exclusion-reason')).toContainText('Write why these rows are left out.')

  const reason = 'Traced across two crossing neurites <b>not</b> one'
  await page.getByRole('textbox', { name: 'Reason (required)' }).fill(reason)
  await page.getByTestId('exclusion-add').click()
  const item = page.getByTestId('exclusion-item')
  await expect(item).toHaveCount(1)
  // Markup typed by a person is shown as text, never rendered.
  await expect(item.getByTestId('exclusion-reason-text')).toHaveText(reason)
  await expect(item).toContainText(`“neurite_length_um” is greater than ${EXCLUDE_ABOVE}`)
  await expect(item).toContainText(`${longerThanLimit} rows`)
  await expect(page.getByTestId('excluded-count')).toHaveText(`${longerThanLimit} rows`)
  await expect(page.getByTestId('dataset-facts')).toContainText(`${longerThanLimit} left out`)
  await capture(page, testInfo, 'rows left out, with the reason')

  // The left-out rows stay stored and are marked in the preview.
  await page.getByTestId('tab-rows').click()
  await page.getByTestId('rows-show-excluded').click()
  await expect(rows).toHaveCount(longerThanLimit)
  await expect(rows.first().getByTestId('row-excluded-mark')).toBeVisible()

  // The same screens in the dark theme.
  await chooseDarkTheme(page)
  await page.getByTestId('tab-nesting').click()
  await expect(page.getByTestId('design-summary')).toBeVisible()
  await capture(page, testInfo, 'nesting editor, dark theme')
  await page.getByTestId('tab-rows').click()
  await expect(page.getByTestId('rows-table')).toBeVisible()
  await capture(page, testInfo, 'rows preview, dark theme')

  // Back on the list, the dataset sits under its project.
  await page.getByTestId('nav-datasets').click()
  const project = page.getByTestId('project-group').filter({ hasText: 'Neurite pilot' })
  await expect(project.getByTestId('dataset-link').filter({ hasText: datasetName })).toBeVisible()
  await capture(page, testInfo, 'datasets list, dark theme')
})

test('a malformed file is refused with the row named next to the drop zone, and nothing is stored', async ({
  page,
}, testInfo) => {
  await page.goto('/sign-in')
  await signIn(page, 'sami@example.org')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Sami')
  await page.goto('/datasets/upload')
  await page.getByTestId('upload-project').locator('input').fill('Neurite pilot')
  await page.getByTestId('upload-project').locator('input').press('Tab')

  const ragged = [
    'lab,mouse,neurite_length_um',
    'nimbus,m1,81.2',
    'nimbus,m1,77.0,extra',
    'nimbus,m2,90.4',
  ].join('\n')
  await page.getByTestId('upload-file-input').setInputFiles({
    name: 'ragged-<i>cells</i>.csv',
    mimeType: 'text/csv',
    buffer: Buffer.from(ragged),
  })
  // The file name holds markup: it must appear as typed.
  await expect(page.getByTestId('chosen-file')).toHaveText('ragged-<i>cells</i>.csv')
  await page.getByTestId('upload-start').click()

  const error = page.getByTestId('upload-error')
  await expect(error).toBeVisible()
  await expect(error).toContainText('Row 3')
  await expect(page).toHaveURL(/\/datasets\/upload$/)
  await capture(page, testInfo, 'upload refused: ragged row')
})

test('the uploader renames and deletes a dataset, the instance admin restores it, and a biostatistician reads it', async ({
  page,
}, testInfo) => {
  test.setTimeout(240_000)
  await page.goto('/sign-in')
  await signIn(page, 'sami@example.org')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Sami')

  // Uploaded through the API with the browser's session: this test is about what comes after.
  const created = await page.request.post('/api/v1/datasets', {
    headers: writeHeaders(page),
    multipart: {
      labId: '1',
      projectName: 'Neurite pilot',
      file: { name: 'neurites-three-labs.csv', mimeType: 'text/csv', buffer: readFileSync(FIXTURE) },
    },
  })
  expect(created.status()).toBe(201)
  const { data } = (await created.json()) as { data: { id: number } }

  await page.goto(`/datasets/${data.id}`)
  const newName = `Renamed neurites ${Date.now()}`
  const description = 'Cultures fixed on day 7 <script>alert(1)</script>'
  await page.getByTestId('edit-details').click()
  await page.getByTestId('details-name').locator('input').fill(newName)
  await page.getByRole('textbox', { name: 'Description' }).fill(description)
  await page.getByTestId('details-save').click()
  await expect(page.getByTestId('dataset-name')).toHaveText(newName)
  await expect(page.getByTestId('dataset-description')).toHaveText(description)

  await page.getByTestId('delete-dataset').click()
  await expect(page.getByTestId('delete-dialog')).toContainText('an admin of this instance can restore it')
  await page.getByTestId('delete-confirm').click()
  await expect(page).toHaveURL(/\/datasets$/)
  await expect(page.getByTestId('dataset-link').filter({ hasText: newName })).toHaveCount(0)

  const menu = await openAccountMenu(page)
  await menu.getByTestId('sign-out').click()
  // Signing out from a page returns there after the next sign-in.
  await signIn(page, 'orla@example.org')
  await expect(page.getByTestId('account-button')).toContainText('Orla Quill')
  await page.getByTestId('nav-datasets').click()
  await page.getByTestId('deleted-datasets-link').click()
  const deletedRow = page.getByTestId('deleted-row').filter({ hasText: newName })
  await expect(deletedRow).toContainText('Nimbus Neurite Lab · Neurite pilot')
  await capture(page, testInfo, 'deleted datasets, as the instance admin')
  await deletedRow.getByTestId('restore-dataset').click()
  await expect(deletedRow).toHaveCount(0)

  const adminMenu = await openAccountMenu(page)
  await adminMenu.getByTestId('sign-out').click()
  await signIn(page, 'bea@example.org')
  await expect(page.getByTestId('account-button')).toContainText('Bea Stone')
  await page.getByTestId('nav-datasets').click()
  await page.getByTestId('dataset-link').filter({ hasText: newName }).click()
  await expect(page.getByTestId('dataset-name')).toHaveText(newName)
  // The drawer keeps "Datasets" lit on a dataset's own page.
  await expect(page.getByTestId('nav-datasets')).toHaveClass(/v-list-item--active/)
  await expect(page.getByTestId('nav-overview')).not.toHaveClass(/v-list-item--active/)
  // A biostatistician reads the nesting but does not change it.
  await expect(page.getByTestId('nesting-form')).toContainText(
    'Scientists and PIs of the lab set the nesting',
  )
  await expect(page.getByTestId('nesting-save')).toHaveCount(0)
  await expect(page.getByTestId('use-suggestion')).toHaveCount(0)
  await expect(page.getByTestId('delete-dataset')).toHaveCount(0)
  await page.getByTestId('tab-columns').click()
  await expect(page.getByTestId('column-row').filter({ hasText: 'neurite_length_um' })).toContainText(
    String(Math.max(...lengths)),
  )
  await capture(page, testInfo, 'column summary, as a biostatistician')
  await page.getByTestId('tab-versions').click()
  await expect(page.getByTestId('version-item')).toHaveCount(1)
  await expect(page.getByTestId('version-sha')).toHaveText(/^[0-9a-f]{64}$/)
  await capture(page, testInfo, 'versions, as a biostatistician')
})
