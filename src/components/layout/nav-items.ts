import type { RouteLocationRaw } from 'vue-router'
import type { CurrentUser, Role } from '../../../shared/schemas/auth'
import { hasAnyRole } from '@/router/access'

export type NavRule = (user: CurrentUser) => boolean

/** Building blocks for `visibleFor`, mirroring the route meta the guard checks. */
export const visibleFor = {
  everyone: (): NavRule => () => true,
  roles:
    (...roles: Role[]): NavRule =>
    (user) =>
      hasAnyRole(user, roles),
  admin: (): NavRule => (user) => user.isAdmin,
}

export interface NavItem {
  /** Stable id, used as a test hook. */
  id: string
  title: string
  icon: string
  to: RouteLocationRaw & { name: string }
  section: 'work' | 'instance'
  visibleFor: NavRule
  /** Other path prefixes whose pages belong to this entry (a plan's page to the planner). */
  alsoUnder?: string[]
}

/**
 * The drawer's entries. A feature adds its entry here together with its route; features not built
 * yet have no entry (no links to empty pages). nav-items.test.ts checks that each rule agrees with
 * the route guard, so the drawer never offers a page the guard would refuse.
 */
export const navItems: NavItem[] = [
  {
    id: 'overview',
    title: 'Overview',
    icon: 'mdi-home-outline',
    to: { name: 'overview' },
    section: 'work',
    visibleFor: visibleFor.everyone(),
  },
  {
    id: 'datasets',
    title: 'Datasets',
    icon: 'mdi-table-multiple',
    to: { name: 'datasets' },
    section: 'work',
    visibleFor: visibleFor.everyone(),
  },
  {
    id: 'analyses',
    title: 'Analyses',
    icon: 'mdi-chart-box-outline',
    to: { name: 'analyses' },
    section: 'work',
    visibleFor: visibleFor.everyone(),
  },
  {
    id: 'planner',
    title: 'Planner',
    icon: 'mdi-calculator-variant-outline',
    to: { name: 'planner' },
    section: 'work',
    visibleFor: visibleFor.everyone(),
    alsoUnder: ['/plans'],
  },
  {
    id: 'lab-board',
    title: 'Lab board',
    icon: 'mdi-view-dashboard-outline',
    to: { name: 'lab-board' },
    section: 'work',
    visibleFor: visibleFor.roles('pi'),
  },
  {
    id: 'reviews',
    title: 'Reviews',
    icon: 'mdi-check-decagram-outline',
    to: { name: 'reviews' },
    section: 'work',
    visibleFor: visibleFor.roles('biostatistician'),
  },
  {
    id: 'lab-members',
    title: 'Lab members',
    icon: 'mdi-account-group-outline',
    to: { name: 'lab-members' },
    section: 'work',
    visibleFor: visibleFor.roles('pi'),
  },
  {
    id: 'lab-audit',
    title: 'Audit log',
    icon: 'mdi-history',
    to: { name: 'lab-audit' },
    section: 'work',
    visibleFor: visibleFor.roles('pi'),
  },
  {
    id: 'admin-people',
    title: 'People & labs',
    icon: 'mdi-account-cog-outline',
    to: { name: 'admin-people' },
    section: 'instance',
    visibleFor: visibleFor.admin(),
    alsoUnder: ['/admin/labs'],
  },
  {
    id: 'admin-outbox',
    title: 'Outbox',
    icon: 'mdi-email-fast-outline',
    to: { name: 'admin-outbox' },
    section: 'instance',
    visibleFor: visibleFor.admin(),
  },
  {
    id: 'admin-audit',
    title: 'Audit log',
    icon: 'mdi-clipboard-text-clock-outline',
    to: { name: 'admin-audit' },
    section: 'instance',
    visibleFor: visibleFor.admin(),
  },
]

export const sectionTitles: Record<NavItem['section'], string | null> = {
  work: null,
  instance: 'This instance',
}

export function navItemsFor(user: CurrentUser | null, items: NavItem[] = navItems): NavItem[] {
  if (!user) return []
  return items.filter((item) => item.visibleFor(user))
}

/**
 * The entry to highlight for the page at `path`: the one whose own path (or one of `alsoUnder`) is
 * the longest prefix of it, so a dataset's page keeps "Datasets" lit. The overview ("/") only
 * matches itself. `pathOf` turns an entry's route into its path.
 */
export function activeNavItem(
  items: NavItem[],
  path: string,
  pathOf: (to: NavItem['to']) => string,
): string | null {
  let best: { id: string; length: number } | null = null
  for (const item of items) {
    for (const prefix of [pathOf(item.to), ...(item.alsoUnder ?? [])]) {
      const matches = prefix === '/' ? path === '/' : path === prefix || path.startsWith(`${prefix}/`)
      if (matches && (!best || prefix.length > best.length)) best = { id: item.id, length: prefix.length }
    }
  }
  return best?.id ?? null
}
