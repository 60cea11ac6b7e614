import { describe, expect, it } from 'vitest'
import { decideAccess } from '@/router/access'
import { routes } from '@/router/routes'
import { allTestUsers, orlaAdmin, petraPi } from '@/testing/users'
import { navItems, navItemsFor, visibleFor, type NavItem } from './nav-items'

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
