import { describe, expect, it } from 'vitest'
import type { AnalysisListItem } from '../../../shared/schemas/analyses'
import type { ReviewRequest } from '../../../shared/schemas/reviews'
import { dataset, versionSummary } from '@/testing/datasets'
import { beaBiostatistician, nellNoLab, petraPi, samiScientist } from '@/testing/users'
import { overviewSteps, type OverviewFacts } from './next-step'

// Invented facts: what a lab's lists might hold.
const none: OverviewFacts = { datasets: [], analyses: [], reviews: [] }
const lab = samiScientist.memberships[0]!.labId

function analysis(
  overrides: Partial<AnalysisListItem> & { minUnits?: number | null } = {},
): AnalysisListItem {
  const { minUnits = 8, ...rest } = overrides
  return {
    id: 5,
    labId: lab,
    labName: 'Nimbus Neurite Lab',
    project: { id: 1, name: 'Pilot' },
    dataset: { id: 3, name: 'Outgrowth' },
    name: 'Neurite length',
    createdBy: { id: samiScientist.id, name: samiScientist.name },
    createdAt: '2026-12-01T10:00:00Z',
    updatedAt: '2026-12-01T10:00:00Z',
    versionCount: 1,
    latestVersion: {
      versionNo: 1,
      status: 'done',
      progress: { stage: 'done', fraction: 1 },
      finishedAt: '2026-12-01T10:01:00Z',
      headline: {
        nObs: 400,
        effectiveN: 20,
        designEffect: 20,
        minUnitsPerCondition: minUnits,
        warningCount: 0,
      },
    },
    ...rest,
  } as AnalysisListItem
}

const request = {
  id: 9,
  analysisId: 5,
  analysisName: 'Neurite length',
  versionNo: 2,
  labId: lab,
  status: 'open',
  requestedBy: { id: samiScientist.id, name: 'Sami Reed' },
  reviewer: { id: beaBiostatistician.id, name: 'Bea Stone' },
  message: '',
  createdAt: '2026-12-02T10:00:00Z',
  decidedAt: null,
} as unknown as ReviewRequest

describe('overview steps', () => {
  it('gives a biostatistician the reviews waiting, linked to each version', () => {
    const steps = overviewSteps(beaBiostatistician, { ...none, reviews: [request] })
    expect(steps.map((s) => s.id)).toEqual(['reviews-waiting'])
    expect(steps[0].title).toBe('1 review waits for you')
    expect(steps[0].items).toEqual([
      {
        key: 'review-9',
        text: 'Neurite length, version 2 (asked by Sami Reed)',
        to: { name: 'analysis', params: { analysisId: '5' }, query: { version: '2' } },
      },
    ])
  })

  it('gives a scientist the tables without a saved nesting and the newest results, not the upload step', () => {
    const untagged = dataset({
      id: 4,
      name: 'New table',
      labId: lab,
      latestVersion: versionSummary({ tagged: false }),
    })
    const tagged = dataset({ id: 3, labId: lab, latestVersion: versionSummary({ tagged: true }) })
    const steps = overviewSteps(samiScientist, {
      ...none,
      datasets: [untagged, tagged],
      analyses: [analysis()],
    })
    expect(steps.map((s) => s.id)).toEqual(['nesting-not-saved', 'results-to-read'])
    expect(steps[0].items!.map((i) => i.text)).toEqual(['New table'])
  })

  it('gives a PI the results resting on few units (fewer than 6 per arm, common practice)', () => {
    const facts = {
      ...none,
      analyses: [analysis({ id: 7, name: 'Thin', minUnits: 5 }), analysis({ id: 8, minUnits: 6 })],
    }
    const steps = overviewSteps(petraPi, facts)
    const thin = steps.find((s) => s.id === 'badges-need-attention')!
    expect(thin.items!.map((i) => i.text)).toEqual(['Thin: 5 units in the smallest arm'])
  })

  it('says nothing waits when the labs have data and nothing is pending', () => {
    const tagged = dataset({
      labId: beaBiostatistician.memberships[0]!.labId,
      latestVersion: versionSummary(),
    })
    expect(overviewSteps(beaBiostatistician, { ...none, datasets: [tagged] }).map((s) => s.id)).toEqual([
      'nothing-waiting',
    ])
  })

  it('keeps the first-time steps for empty labs, unknown lists and no lab at all', () => {
    expect(overviewSteps(samiScientist, none).map((s) => s.id)).toEqual(['upload-first-table'])
    expect(overviewSteps(samiScientist, { datasets: null, analyses: null, reviews: null })[0].id).toBe(
      'upload-first-table',
    )
    expect(overviewSteps(nellNoLab, none)[0].id).toBe('join-a-lab')
  })
})
