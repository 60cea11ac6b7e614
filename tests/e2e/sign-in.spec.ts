import { expect, test } from '@playwright/test'
import { attachScreenshot, openAccountMenu, signIn } from './support/demo'

/** The agreed navigation per role, in drawer order. */
const NAV_BY_ROLE = {
  everyone: ['Overview', 'Datasets', 'Analyses', 'Planner'],
  pi: ['Lab board', 'Lab members', 'Audit log'],
  biostatistician: ['Reviews'],
  admin: ['People & labs', 'Outbox', 'Audit log'],
} as const

type NavGroup = keyof typeof NAV_BY_ROLE

function expectedNav(groups: NavGroup[]): string[] {
  return groups.flatMap((group) => NAV_BY_ROLE[group])
}

const demoPeople = [
  {
    who: 'admin',
    email: 'orla@example.org',
    firstName: 'Orla',
    navGroups: ['everyone', 'admin'] as NavGroup[],
    accountLines: ['Instance admin'],
  },
  {
    who: 'PI',
    email: 'petra@example.org',
    firstName: 'Petra',
    navGroups: ['everyone', 'pi'] as NavGroup[],
    accountLines: ['Nimbus Neurite Lab', 'PI (lab head)'],
  },
  {
    who: 'scientist',
    email: 'sami@example.org',
    firstName: 'Sami',
    navGroups: ['everyone'] as NavGroup[],
    accountLines: ['Nimbus Neurite Lab', 'Scientist'],
  },
  {
    who: 'biostatistician',
    email: 'bea@example.org',
    firstName: 'Bea',
    navGroups: ['everyone', 'biostatistician'] as NavGroup[],
    accountLines: ['Nimbus Neurite Lab', 'Fernhill Culture Lab', 'Biostatistician'],
  },
]

const allNavLabels = Object.values(NAV_BY_ROLE).flat()

for (const person of demoPeople) {
  test(`the ${person.who} signs in and sees their own navigation and roles`, async ({ page }, testInfo) => {
    await page.goto('/')
    await expect(page).toHaveURL(/\/sign-in$/)

    await signIn(page, person.email)

    await expect(page).toHaveURL(/\/$/)
    await expect(page.getByRole('heading', { level: 1 })).toHaveText(`Welcome, ${person.firstName}`)

    const nav = page.getByTestId('main-nav')
    const expected = expectedNav(person.navGroups)
    await expect(nav.locator('.v-list-item-title')).toHaveText(expected)
    for (const label of allNavLabels.filter((l) => !expected.includes(l))) {
      await expect(nav.getByText(label, { exact: true })).toHaveCount(0)
    }

    await attachScreenshot(page, testInfo, `signed-in shell (${person.who})`)

    const menu = await openAccountMenu(page)
    await expect(menu).toContainText(person.email)
    for (const line of person.accountLines) await expect(menu).toContainText(line)
    await attachScreenshot(page, testInfo, `account menu (${person.who})`)
  })
}

test('a wrong password shows the error and keeps the visitor on the sign-in page', async ({
  page,
}, testInfo) => {
  await page.goto('/sign-in')
  await signIn(page, 'sami@example.org', 'not-the-password')

  const error = page.getByTestId('error-notice')
  await expect(error).toContainText('Sign-in failed')
  await expect(error).toContainText('The email or password is not right.')
  await expect(page).toHaveURL(/\/sign-in$/)
  await expect(page.getByLabel('Password', { exact: true })).toHaveValue('')
  await attachScreenshot(page, testInfo, 'wrong password')
})

test('signing out returns to the sign-in page and ends the session', async ({ page }) => {
  await page.goto('/sign-in')
  await signIn(page, 'petra@example.org')
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Welcome, Petra')

  const menu = await openAccountMenu(page)
  await menu.getByTestId('sign-out').click()
  await expect(page).toHaveURL(/\/sign-in$/)

  // The server forgot the session too: a fresh load of a protected page asks to sign in again.
  await page.goto('/')
  await expect(page).toHaveURL(/\/sign-in$/)
  await expect(page.getByRole('button', { name: 'Sign in' })).toBeVisible()
})

test('after signing in, the visitor lands on the page they asked for', async ({ page }) => {
  await page.goto('/not-available')
  await expect(page).toHaveURL(/\/sign-in\?redirect=(%2F|\/)not-available$/)
  await signIn(page, 'sami@example.org')
  await expect(page).toHaveURL(/\/not-available$/)
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Not available for your role')
})
