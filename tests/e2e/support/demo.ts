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
