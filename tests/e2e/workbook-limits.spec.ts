import { expect, test } from '@playwright/test'
import { sharedStringsBomb } from '../support/xlsx-files'
import { attachScreenshot, signIn } from './support/demo'

/**
 * A workbook that unpacks far beyond its size (an archive bomb, made here: 1.2 MB whose shared
 * texts unpack to 486 MB) is refused at once, the message next to the drop zone names the part and
 * the limit, and nothing is stored.
 */
test('a workbook that unpacks to hundreds of megabytes is refused, naming the limit, and nothing is stored', async ({
  page,
}, testInfo) => {
  const bomb = await sharedStringsBomb(30_000_000)
  await page.goto('/sign-in')
  await signIn(page, 'sami@example.org')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Sami')
  const before = (await (await page.request.get('/api/v1/datasets')).json()).data.length

  await page.goto('/datasets/upload')
  await page.getByTestId('upload-project').locator('input').fill('Neurite pilot')
  await page.getByTestId('upload-project').locator('input').press('Tab')
  await page.getByTestId('upload-file-input').setInputFiles({
    name: 'cells.xlsx',
    mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
    buffer: bomb,
  })
  await page.getByTestId('upload-start').click()

  const error = page.getByTestId('upload-error')
  await expect(error).toContainText('xl/sharedStrings.xml (the texts the sheets share) unpacks to 486 MB')
  await expect(error).toContainText('UPLOAD_MAX_MB')
  await expect(page).toHaveURL(/\/datasets\/upload$/)
  expect((await (await page.request.get('/api/v1/datasets')).json()).data.length).toBe(before)
  await attachScreenshot(page, testInfo, 'upload refused: workbook limit')
})
