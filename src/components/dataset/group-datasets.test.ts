import { describe, expect, it } from 'vitest'
import { beaBiostatistician } from '@/testing/users'
import { groupDatasets } from './group-datasets'
import { dataset, project } from '@/testing/datasets'

describe('groupDatasets', () => {
  it('groups by lab in membership order, then by project name, newest change first', () => {
    const groups = groupDatasets(
      beaBiostatistician.memberships,
      [
        project({ id: 1, name: 'Pilot' }),
        project({ id: 2, name: 'Dose series' }),
        project({ id: 3, labId: 2, name: 'Agreement' }),
      ],
      [
        dataset({ id: 10, project: { id: 1, name: 'Pilot' }, updatedAt: '2026-12-01T10:00:00Z' }),
        dataset({ id: 11, project: { id: 1, name: 'Pilot' }, updatedAt: '2026-12-02T10:00:00Z' }),
        dataset({ id: 12, labId: 2, labName: 'Fernhill Culture Lab', project: { id: 3, name: 'Agreement' } }),
      ],
    )
    expect(groups.map((g) => g.labName)).toEqual(['Nimbus Neurite Lab', 'Fernhill Culture Lab'])
    expect(groups[0].projects.map((p) => p.name)).toEqual(['Dose series', 'Pilot'])
    expect(groups[0].projects[1].datasets.map((d) => d.id)).toEqual([11, 10])
    // A project without datasets stays, so it can still be uploaded to.
    expect(groups[0].projects[0].datasets).toEqual([])
    expect(groups[1].projects[0].datasets.map((d) => d.id)).toEqual([12])
  })

  it('keeps datasets whose project is missing from the project list', () => {
    const groups = groupDatasets(
      beaBiostatistician.memberships,
      [],
      [dataset({ project: { id: 7, name: 'Unlisted' } })],
    )
    expect(groups[0].projects).toMatchObject([{ id: 7, name: 'Unlisted' }])
  })
})
