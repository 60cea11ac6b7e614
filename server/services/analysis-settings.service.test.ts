import { describe, expect, it } from 'vitest'
import type { ColumnProfile } from '../../shared/schemas/datasets'
import { AppError } from '../errors/app-error'
import {
  checkSettingsAgainstColumns,
  knownLabels,
  mergeSettings,
  settingsFromTagging,
} from './analysis-settings.service'

const base = settingsFromTagging({
  responseColumns: ['neurite_um', 'soma_um2'],
  conditionColumn: 'treatment',
  levels: ['lab', 'mouse'],
})!

function column(name: string, extra: Partial<ColumnProfile> = {}): ColumnProfile {
  return {
    position: 1,
    name,
    type: 'text',
    missingCount: 0,
    distinctCount: 2,
    distinctCapped: false,
    min: null,
    max: null,
    mean: null,
    sd: null,
    sampleValues: [],
    topValues: [
      { value: 'vehicle', count: 10 },
      { value: 'NW-117', count: 10 },
    ],
    ...extra,
  }
}

function issuesOf(run: () => unknown) {
  try {
    run()
  } catch (err) {
    expect(err).toBeInstanceOf(AppError)
    return {
      status: (err as AppError).status,
      message: (err as AppError).message,
      details: (err as AppError).details as { issues: { path: string }[] },
    }
  }
  throw new Error('expected a 400')
}

describe('settingsFromTagging', () => {
  it('takes the first response, the condition and the levels, with the display defaults', () => {
    expect(base).toEqual({
      response: 'neurite_um',
      condition: 'treatment',
      levels: ['lab', 'mouse'],
      reference: null,
      errorBar: 'sem',
      bootstrap: { enabled: false, resamples: 2000, seed: '1' },
    })
    expect(settingsFromTagging(null)).toBeNull()
  })
})

describe('mergeSettings', () => {
  it('keeps the reference while the condition stays, and drops it when the condition changes', () => {
    const withReference = mergeSettings(base, { reference: 'vehicle' })
    expect(mergeSettings(withReference, { levels: ['mouse'] }).reference).toBe('vehicle')
    expect(mergeSettings(withReference, { condition: 'genotype' }).reference).toBeNull()
    expect(mergeSettings(withReference, { condition: null }).reference).toBeNull()
  })

  it('merges bootstrap fields one by one', () => {
    const on = mergeSettings(base, { bootstrap: { enabled: true, seed: 'abc' } })
    expect(on.bootstrap).toEqual({ enabled: true, resamples: 2000, seed: 'abc' })
    expect(mergeSettings(on, { bootstrap: { resamples: 500 } }).bootstrap).toEqual({
      enabled: true,
      resamples: 500,
      seed: 'abc',
    })
  })

  it('asks for response and levels when there is no tagging, and reports schema problems under settings.*', () => {
    const missing = issuesOf(() => mergeSettings(null, { condition: 'treatment' }))
    expect(missing.status).toBe(400)
    expect(missing.details.issues.map((i) => i.path)).toEqual(['settings.response', 'settings.levels'])
    const twice = issuesOf(() => mergeSettings(base, { response: 'mouse' }))
    expect(twice.message).toContain('"mouse" is used twice')
    const noCondition = issuesOf(() => mergeSettings(base, { condition: null, reference: 'vehicle' }))
    expect(noCondition.details.issues[0].path).toBe('settings.reference')
  })
})

describe('checkSettingsAgainstColumns', () => {
  const columns = [
    column('lab'),
    column('mouse'),
    column('treatment'),
    column('neurite_um', { type: 'numeric', topValues: null, distinctCount: 900 }),
  ]

  it('accepts settings whose columns all exist', () => {
    expect(() =>
      checkSettingsAgainstColumns(mergeSettings(base, { reference: 'NW-117' }), columns, 1),
    ).not.toThrow()
  })

  it('names every missing column with its place in the settings', () => {
    const problem = issuesOf(() =>
      checkSettingsAgainstColumns(mergeSettings(base, { levels: ['site', 'mouse'] }), columns.slice(1), 3),
    )
    expect(problem.message).toBe('Version 3 of this dataset has no column “site”.')
    expect(problem.details.issues.map((i) => i.path)).toEqual(['settings.levels.0'])
  })

  it('refuses an empty response and a reference that is not a condition label', () => {
    const empty = [...columns.slice(0, 3), column('neurite_um', { type: 'empty' })]
    expect(issuesOf(() => checkSettingsAgainstColumns(base, empty, 1)).message).toContain('has no values')
    expect(
      issuesOf(() => checkSettingsAgainstColumns(mergeSettings(base, { reference: 'saline' }), columns, 1))
        .message,
    ).toContain('“saline” is not a value of “treatment”')
  })
})

describe('knownLabels', () => {
  it('lists labels only when the profile holds all of them', () => {
    expect(knownLabels(column('treatment'))).toEqual(['vehicle', 'NW-117'])
    expect(knownLabels(column('treatment', { distinctCount: 3 }))).toBeNull()
    expect(knownLabels(column('treatment', { distinctCapped: true }))).toBeNull()
    expect(knownLabels(undefined)).toBeNull()
  })
})
