import { describe, expect, it } from 'vitest'
import { beaBiostatistician, orlaAdmin, petraPi, samiScientist } from '@/testing/users'
import { rolesOf } from '../../shared/access'
import { decideAccess, hasAnyRole, safeRedirect } from './access'

describe('rolesOf / hasAnyRole', () => {
  it('collects roles across labs', () => {
    expect([...rolesOf(beaBiostatistician)]).toEqual(['biostatistician'])
    expect(rolesOf(null).size).toBe(0)
    expect(hasAnyRole(petraPi, ['pi', 'biostatistician'])).toBe(true)
    expect(hasAnyRole(samiScientist, ['pi'])).toBe(false)
  })
})

describe('decideAccess', () => {
  it('lets anyone see public pages', () => {
    expect(decideAccess({ public: true }, null)).toBe('allow')
  })

  it('sends anonymous visitors of any other page to sign-in', () => {
    expect(decideAccess({}, null)).toBe('sign-in')
    expect(decideAccess({ roles: ['pi'] }, null)).toBe('sign-in')
  })

  it('checks roles and the admin flag', () => {
    expect(decideAccess({}, samiScientist)).toBe('allow')
    expect(decideAccess({ roles: ['pi'] }, petraPi)).toBe('allow')
    expect(decideAccess({ roles: ['pi'] }, samiScientist)).toBe('not-available')
    expect(decideAccess({ admin: true }, orlaAdmin)).toBe('allow')
    expect(decideAccess({ admin: true }, petraPi)).toBe('not-available')
    // Admin is an instance flag, not a lab role: it does not open lab-role pages.
    expect(decideAccess({ roles: ['pi'] }, orlaAdmin)).toBe('not-available')
  })

  it('requires both when a page asks for admin and a role', () => {
    expect(decideAccess({ admin: true, roles: ['pi'] }, orlaAdmin)).toBe('not-available')
    expect(decideAccess({ admin: true, roles: ['pi'] }, { ...petraPi, isAdmin: true })).toBe('allow')
  })
})

describe('safeRedirect', () => {
  it('keeps same-site paths with their query', () => {
    expect(safeRedirect('/datasets/4?tab=units')).toBe('/datasets/4?tab=units')
  })

  it('refuses other sites, protocol-relative links, non-strings and the sign-in page itself', () => {
    expect(safeRedirect('https://elsewhere.example/')).toBe('/')
    expect(safeRedirect('//elsewhere.example/')).toBe('/')
    expect(safeRedirect('/\\elsewhere.example/')).toBe('/')
    expect(safeRedirect(['/a'])).toBe('/')
    expect(safeRedirect(undefined)).toBe('/')
    expect(safeRedirect('/sign-in?redirect=/x')).toBe('/')
    expect(safeRedirect('javascript:alert(1)', '/home')).toBe('/home')
  })
})
