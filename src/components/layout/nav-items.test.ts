import { describe, expect, it } from 'vitest'
import { decideAccess } from '@/router/access'
import { routes } from '@/router/routes'
import { allTestUsers, orlaAdmin, petraPi } from '@/testing/users'
import { activeNavItem, navItems, navItemsFor, visibleFor, type NavItem } from './nav-items'

describe('navItemsFor', () => {
  it('shows nothing to an anonymous visitor', () => {
    expect(navItemsFor(null)).toEqual([])
  })

  it('filters by each item rule', () => {
    const items: NavItem[] = [
      {
        id: 'a',
        title: 'A',
        icon: '',
        to: { name: 'a' },
        section: 'work',
        visibleFor: visibleFor.everyone(),
      },
      {
        id: 'b',
        title: 'B',
        icon: '',
        to: { name: 'b' },
        section: 'work',
        visibleFor: visibleFor.roles('pi'),
      },
      {
        id: 'c',
        title: 'C',
        icon: '',
        to: { name: 'c' },
        section: 'instance',
        visibleFor: visibleFor.admin(),
      },
    ]
    expect(navItemsFor(petraPi, items).map((i) => i.id)).toEqual(['a', 'b'])
    expect(navItemsFor(orlaAdmin, items).map((i) => i.id)).toEqual(['a', 'c'])
  })
})

describe('navItems', () => {
  it('points every entry at a registered route', () => {
    const names = new Set(routes.map((r) => r.name))
    for (const item of navItems) expect(names, item.id).toContain(item.to.name)
  })

  it('shows an entry exactly when the route guard would let that person in', () => {
    for (const item of navItems) {
      const route = routes.find((r) => r.name === item.to.name)!
      for (const user of allTestUsers) {
        const allowed = decideAccess(route.meta ?? {}, user) === 'allow'
        expect(item.visibleFor(user), `${item.id} for ${user.email}`).toBe(allowed)
      }
    }
  })
})

describe('activeNavItem', () => {
  const paths: Record<string, string> = {
    overview: '/',
    datasets: '/datasets',
    analyses: '/analyses',
    planner: '/planner',
    'admin-people': '/admin/people',
  }
  const items = navItems.filter((item) => item.id in paths)
  const active = (path: string) => activeNavItem(items, path, (to) => paths[to.name])

  it('keeps the list entry lit on the pages below it', () => {
    expect(active('/datasets')).toBe('datasets')
    expect(active('/datasets/12')).toBe('datasets')
    expect(active('/analyses/3/versions/2/agreement')).toBe('analyses')
    expect(active('/plans/7')).toBe('planner')
    expect(active('/admin/labs/2')).toBe('admin-people')
  })

  it('lights the overview only on itself, and nothing on unrelated pages', () => {
    expect(active('/')).toBe('overview')
    expect(active('/datasets-old')).toBeNull()
    expect(active('/s/abc')).toBeNull()
  })
})
