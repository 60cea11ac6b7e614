import { expect, test, type Page } from '@playwright/test'
import { checkPage, expectNoSeriousViolations, type PageCheck } from './support/axe'
import { demoAnalysis, signIn, writeHeaders } from './support/demo'

// Every main page, for every role, through axe (WCAG 2.1 A and AA): a critical or serious
// violation fails. Pages load their data first (charts and tables included), so axe sees what a
// person sees.
test.setTimeout(300_000)

const SINGLE_LAB = 'Neurite length, NW-117 vs vehicle'
const THREE_LABS = 'Neurite length across three labs'

async function signedIn(page: Page, email: string): Promise<void> {
  await page.goto('/sign-in')
  await signIn(page, email)
  await expect(page.getByTestId('nav-overview')).toBeVisible({ timeout: 30_000 })
}

/** Opens a path and waits for its heading, then for `ready` when given. */
async function open(page: Page, path: string, ready?: string): Promise<void> {
  await page.goto(path)
  await expect(page.locator('h1').first()).toBeVisible({ timeout: 30_000 })
  if (ready) await expect(page.getByTestId(ready).first()).toBeVisible({ timeout: 60_000 })
}

async function firstDatasetId(page: Page): Promise<number> {
  const res = await page.request.get('/api/v1/datasets')
  expect(res.ok()).toBe(true)
  const list = (await res.json()).data as { id: number }[]
  expect(list.length).toBeGreaterThan(0)
  return list[0].id
}

test('scientist pages have no critical or serious accessibility violations', async ({ page }, testInfo) => {
  await signedIn(page, 'sami@example.org')
  const analysis = await demoAnalysis(page, SINGLE_LAB)
  const datasetId = await firstDatasetId(page)
  const checks: PageCheck[] = []
  const visit = async (name: string, path: string, ready?: string) => {
    await open(page, path, ready)
    checks.push(await checkPage(page, `scientist ${name}`, testInfo))
  }
  await visit('overview', '/')
  await visit('datasets', '/datasets')
  await visit('dataset', `/datasets/${datasetId}`, 'dataset-name')
  await visit('upload', '/datasets/upload', 'upload-lab')
  await visit('analyses', '/analyses', 'analyses-list')
  await visit('analysis', `/analyses/${analysis.id}`, 'result-body')
  await visit('new analysis', '/analyses/new')
  await visit('planner', `/planner?analysisId=${analysis.id}&versionNo=1`, 'plan-inputs')
  expectNoSeriousViolations(checks)
})

test('PI pages have no critical or serious accessibility violations', async ({ page }, testInfo) => {
  await signedIn(page, 'petra@example.org')
  const threeLabs = await demoAnalysis(page, THREE_LABS)
  const checks: PageCheck[] = []
  const visit = async (name: string, path: string, ready?: string) => {
    await open(page, path, ready)
    checks.push(await checkPage(page, `PI ${name}`, testInfo))
  }
  await visit('overview', '/')
  await visit('lab board', '/lab/board', 'lab-board')
  await visit('lab members', '/lab/members', 'lab-name')
  await visit('audit log', '/lab/audit', 'audit-table')
  await visit('agreement', `/analyses/${threeLabs.id}/versions/1/agreement`, 'agreement-findings')
  await visit('print view', `/analyses/${threeLabs.id}/versions/1/print`, 'print-page')
  expectNoSeriousViolations(checks)
})

test('biostatistician pages have no critical or serious accessibility violations', async ({
  page,
}, testInfo) => {
  await signedIn(page, 'bea@example.org')
  const analysis = await demoAnalysis(page, SINGLE_LAB)
  const checks: PageCheck[] = []
  const visit = async (name: string, path: string, ready?: string) => {
    await open(page, path, ready)
    checks.push(await checkPage(page, `biostatistician ${name}`, testInfo))
  }
  await visit('overview', '/')
  await visit('reviews', '/reviews')
  await visit('analysis', `/analyses/${analysis.id}`, 'result-body')
  await visit('planner', '/planner', 'plan-inputs')
  expectNoSeriousViolations(checks)
})

test('admin pages have no critical or serious accessibility violations', async ({ page }, testInfo) => {
  await signedIn(page, 'orla@example.org')
  const checks: PageCheck[] = []
  const visit = async (name: string, path: string, ready?: string) => {
    await open(page, path, ready)
    checks.push(await checkPage(page, `admin ${name}`, testInfo))
  }
  await visit('overview', '/')
  await visit('people and labs', '/admin/people', 'people-table')
  await visit('outbox', '/admin/outbox', 'outbox-table')
  await visit('audit log', '/admin/audit', 'audit-table')
  await visit('deleted datasets', '/datasets/deleted')
  expectNoSeriousViolations(checks)
})

test('the sign-in page and the read-only link have no critical or serious violations', async ({
  page,
  browser,
}, testInfo) => {
  const checks: PageCheck[] = []
  // Nobody signed in is not an error: these pages ask no question that answers 401.
  const refused: string[] = []
  page.on('response', (r) => void (r.status() === 401 && refused.push(r.url())))
  await open(page, '/sign-in')
  checks.push(await checkPage(page, 'anonymous sign-in', testInfo))
  expect(refused, 'requests answered 401 on the sign-in page').toEqual([])

  await signIn(page, 'petra@example.org')
  await expect(page.getByTestId('nav-overview')).toBeVisible({ timeout: 30_000 })
  const analysis = await demoAnalysis(page, SINGLE_LAB)
  const res = await page.request.post(`/api/v1/analyses/${analysis.id}/share-links`, {
    headers: writeHeaders(page),
    data: { versionNo: 1, allowUnitTable: true },
  })
  expect(res.status(), await res.text()).toBe(201)
  const { url } = ((await res.json()) as { data: { url: string } }).data

  const guestContext = await browser.newContext()
  const guest = await guestContext.newPage()
  guest.on('response', (r) => void (r.status() === 401 && refused.push(r.url())))
  await guest.goto(new URL(url).pathname)
  await expect(guest.getByTestId('shared-name')).toHaveText(SINGLE_LAB, { timeout: 90_000 })
  checks.push(await checkPage(guest, 'anonymous read-only link', testInfo))
  expect(refused, 'requests answered 401 on the read-only link').toEqual([])
  await guestContext.close()
  expectNoSeriousViolations(checks)
})
