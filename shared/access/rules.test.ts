import { describe, expect, it } from 'vitest'
import type { CurrentUser } from '../schemas/auth'
import {
  canDeleteDataset,
  canManageLab,
  canRead,
  canRequestReview,
  canRestoreDatasets,
  canShare,
  canSignOff,
  canWithdrawReview,
  canWrite,
  ledLabs,
  readableLabIds,
  rolesOf,
  writableLabs,
  writeRefusal,
} from './index'

// An invented team: one person per role in lab 1; the PI is a scientist in lab 2.
const person = (id: number, memberships: CurrentUser['memberships'], isAdmin = false): CurrentUser => ({
  id,
  email: `p${id}@example.test`,
  name: `Person ${id}`,
  isAdmin,
  memberships,
})
const pi = person(1, [
  { labId: 1, labName: 'Alder Lab', role: 'pi' },
  { labId: 2, labName: 'Birch Lab', role: 'scientist' },
])
const scientist = person(2, [{ labId: 1, labName: 'Alder Lab', role: 'scientist' }])
const biostatistician = person(3, [{ labId: 1, labName: 'Alder Lab', role: 'biostatistician' }])
const admin = person(4, [], true)
const outsider = person(5, [{ labId: 9, labName: 'Cedar Lab', role: 'pi' }])

describe('lab roles', () => {
  it('read for members, write for scientists and PIs, lead for PIs, per lab', () => {
    expect([pi, scientist, biostatistician, admin, outsider].map((u) => canRead(u, 1))).toEqual([
      true,
      true,
      true,
      false,
      false,
    ])
    expect([pi, scientist, biostatistician, admin].map((u) => canWrite(u, 1))).toEqual([
      true,
      true,
      false,
      false,
    ])
    expect(canWrite(pi, 2)).toBe(true)
    expect([pi, scientist, admin, outsider].map((u) => canManageLab(u, 1))).toEqual([
      true,
      false,
      true,
      false,
    ])
    expect(canManageLab(pi, 2)).toBe(false)
  })

  it('list the labs for pickers', () => {
    expect(readableLabIds(pi)).toEqual([1, 2])
    expect(writableLabs(pi).map((m) => m.labName)).toEqual(['Alder Lab', 'Birch Lab'])
    expect(writableLabs(biostatistician)).toEqual([])
    expect(writableLabs(null)).toEqual([])
    expect(ledLabs(pi).map((m) => m.labId)).toEqual([1])
    expect([...rolesOf(pi)]).toEqual(['pi', 'scientist'])
  })
})

describe('rules about a record', () => {
  it('deleting a dataset: its uploader or a PI of its lab', () => {
    const dataset = { labId: 1, createdById: scientist.id }
    expect([pi, scientist, biostatistician, admin].map((u) => canDeleteDataset(u, dataset))).toEqual([
      true,
      true,
      false,
      false,
    ])
    expect(canDeleteDataset(scientist, { labId: 9, createdById: scientist.id })).toBe(false)
    expect(canRestoreDatasets(admin)).toBe(true)
    expect(canRestoreDatasets(pi)).toBe(false)
  })

  it('sharing: a PI or an author, never outside the lab', () => {
    const analysis = { labId: 1, authorIds: [scientist.id] }
    expect([pi, scientist, biostatistician, outsider].map((u) => canShare(u, analysis))).toEqual([
      true,
      true,
      false,
      false,
    ])
  })

  it('reviews: writers ask, a biostatistician who did not write it signs off, the asker or a PI withdraws', () => {
    expect([pi, scientist, biostatistician].map((u) => canRequestReview(u, 1))).toEqual([true, true, false])
    expect(canSignOff(biostatistician, { labId: 1, authorIds: [scientist.id] })).toBe(true)
    expect(canSignOff(biostatistician, { labId: 1, authorIds: [biostatistician.id] })).toBe(false)
    expect(canSignOff(pi, { labId: 1, authorIds: [] })).toBe(false)
    const request = { labId: 1, requestedById: scientist.id }
    expect([pi, scientist, biostatistician].map((u) => canWithdrawReview(u, request))).toEqual([
      true,
      true,
      false,
    ])
  })

  it('refusals name what the role is needed for', () => {
    expect(writeRefusal('plan', 'Alder Lab')).toBe(
      'Saving, changing and deleting plans needs the role scientist or PI in Alder Lab.',
    )
  })
})
