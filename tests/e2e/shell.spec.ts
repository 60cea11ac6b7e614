import { expect, test } from '@playwright/test'
import { attachScreenshot, openAccountMenu, signIn } from './support/demo'

test('the theme choice is remembered across visits', async ({ page }, testInfo) => {
  await page.goto('/sign-in')
  await signIn(page, 'bea@example.org')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Bea')

  const app = page.locator('.v-application')
  await expect(app).toHaveClass(/v-theme--nestwiseLight/)

  const menu = await openAccountMenu(page)
  await menu.getByTestId('theme-switch').locator('input').click()
  await expect(app).toHaveClass(/v-theme--nestwiseDark/)
  await page.keyboard.press('Escape')
  await attachScreenshot(page, testInfo, 'overview, dark theme')

  await page.reload()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Bea')
  await expect(page.locator('.v-application')).toHaveClass(/v-theme--nestwiseDark/)
})

test('an unknown address shows a page-not-found message, not a blank page', async ({ page }, testInfo) => {
  await page.goto('/sign-in')
  await signIn(page, 'sami@example.org')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Sami')

  await page.goto('/no/such/page')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('This page does not exist')
  await page.getByRole('link', { name: 'Go to the overview' }).click()
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Sami')
  await attachScreenshot(page, testInfo, 'overview after not-found')
})

test('the overview tells a scientist what waits, not to upload a first table when the lab has data', async ({
  page,
}, testInfo) => {
  await page.goto('/sign-in')
  await signIn(page, 'sami@example.org')
  // Sami made the seeded single-lab analysis: his newest results are listed, linked.
  const results = page.locator('[data-testid="next-step"][data-step="results-to-read"]')
  await expect(results).toContainText('Neurite length, NW-117 vs vehicle')
  await expect(
    page.getByTestId('next-step').filter({ hasText: 'Upload a per-cell table to start' }),
  ).toHaveCount(0)
  await expect(page.getByTestId('lab-roles')).toContainText('Nimbus Neurite Lab')
  await attachScreenshot(page, testInfo, 'overview of a scientist with data')
  await results.getByRole('link', { name: /Neurite length, NW-117 vs vehicle/ }).click()
  await expect(page.getByTestId('analysis-name')).toHaveText('Neurite length, NW-117 vs vehicle')
})
