import { expect, type Page, type TestInfo } from '@playwright/test'

/** Demo-only password shared by the seeded accounts. */
export const DEMO_PASSWORD = 'nestwise-demo'

export async function signIn(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.getByLabel('Email address').fill(email)
  await page.getByLabel('Password', { exact: true }).fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
}

export async function openAccountMenu(page: Page) {
  await page.getByTestId('account-button').click()
  const menu = page.getByTestId('account-menu')
  await expect(menu).toBeVisible()
  return menu
}

/** Attaches a full-page screenshot to the test's output (list and HTML reports). */
export async function attachScreenshot(page: Page, testInfo: TestInfo, name: string): Promise<void> {
  await testInfo.attach(name, { body: await page.screenshot({ fullPage: true }), contentType: 'image/png' })
}

/** Headers of a write through the API with the browser's session, as the app sends them. */
export function writeHeaders(page: Page): Record<string, string> {
  return { 'X-Requested-With': 'nestwise', Origin: new URL(page.url()).origin }
}

/** A demo analysis the signed-in person can see, found by name; the test fails when it is missing. */
export async function demoAnalysis(page: Page, name: string): Promise<{ id: number; labId: number }> {
  const res = await page.request.get('/api/v1/analyses')
  expect(res.ok()).toBe(true)
  const list = (await res.json()).data as { id: number; name: string; labId: number }[]
  const found = list.find((a) => a.name === name)
  expect(found, `demo analysis "${name}"`).toBeTruthy()
  return found!
}

/** From the upload page, uploads `csv` as the file `file` into `project`, named `name`, and starts the upload. */
export async function uploadCsv(
  page: Page,
  upload: { project: string; file: string; csv: string; name: string },
): Promise<void> {
  await page.goto('/datasets/upload')
  await page.getByTestId('upload-project').locator('input').fill(upload.project)
  await page.getByTestId('upload-project').locator('input').press('Tab')
  await page.getByTestId('upload-file-input').setInputFiles({
    name: upload.file,
    mimeType: 'text/csv',
    buffer: Buffer.from(upload.csv, 'utf8'),
  })
  await page.getByTestId('upload-name').locator('input').fill(upload.name)
  await page.getByTestId('upload-start').click()
}
