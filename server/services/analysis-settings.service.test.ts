import { describe, expect, it } from 'vitest'
import type { ColumnProfile } from '../../shared/schemas/datasets'
import { AppError } from '../errors/app-error'
import {
  checkSettingsAgainstColumns,
  knownLabels,
  labelsByColumn,
  mergeSettings,
  responseKinds,
  settingsFromTagging,
} from './analysis-settings.service'

const base = settingsFromTagging({
  tagging: {
    responseColumns: ['neurite_um', 'soma_um2'],
    conditionColumn: 'treatment',
    levels: ['lab', 'mouse'],
  },
  columns: [],
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
  it('takes the first response, the condition as the one factor, the levels and the defaults', () => {
    expect(base).toEqual({
      response: 'neurite_um',
      conditions: ['treatment'],
      covariates: [],
      levels: ['lab', 'mouse'],
      reference: {},
      bootstrap: { enabled: false, resamples: 2000, seed: '1' },
      family: 'gaussian',
      trials: null,
      positive: null,
    })
    expect(
      settingsFromTagging({
        tagging: { responseColumns: ['neurite_um'], conditionColumn: null, levels: ['mouse'] },
        columns: [],
      })?.conditions,
    ).toEqual([])
    expect(settingsFromTagging({ tagging: null, columns: [] })).toBeNull()
  })

  const tagging = { responseColumns: ['outcome'], conditionColumn: 'treatment', levels: ['lab', 'mouse'] }
  const twoLabels = (a: string, b: string) =>
    column('outcome', {
      topValues: [
        { value: a, count: 12 },
        { value: b, count: 8 },
      ],
    })

  it('starts a two-valued text response as yes/no, the value counted as yes chosen as the form does', () => {
    expect(settingsFromTagging({ tagging, columns: [twoLabels('unbranched', 'branched')] })).toMatchObject({
      response: 'outcome',
      family: 'binomial',
      trials: null,
      // Neither reads as yes: the second in alphabetical order (defaultPositiveLabel).
      positive: 'unbranched',
    })
    expect(settingsFromTagging({ tagging, columns: [twoLabels('no', 'yes')] })?.positive).toBe('yes')
  })

  it('keeps a numeric response normal, even one holding only 0 and 1', () => {
    const zeroOne = column('outcome', {
      type: 'integer',
      min: 0,
      max: 1,
      topValues: [
        { value: '0', count: 12 },
        { value: '1', count: 8 },
      ],
    })
    expect(settingsFromTagging({ tagging, columns: [zeroOne] })).toMatchObject({
      family: 'gaussian',
      positive: null,
    })
  })

  it('keeps a text response with more values than the profile lists normal (tagging saw numbers there)', () => {
    const many = column('outcome', { distinctCount: 40, distinctCapped: false, topValues: null })
    expect(settingsFromTagging({ tagging, columns: [many] })?.family).toBe('gaussian')
  })
})

describe('mergeSettings', () => {
  it('keeps a reference while its factor stays a condition, and drops it when the factor goes', () => {
    const withReference = mergeSettings(base, { reference: { treatment: 'vehicle' } })
    expect(mergeSettings(withReference, { levels: ['mouse'] }).reference).toEqual({ treatment: 'vehicle' })
    expect(mergeSettings(withReference, { conditions: ['genotype', 'treatment'] }).reference).toEqual({
      treatment: 'vehicle',
    })
    expect(mergeSettings(withReference, { conditions: ['genotype'] }).reference).toEqual({})
    expect(mergeSettings(withReference, { conditions: [] }).reference).toEqual({})
  })

  it('takes two conditions and covariates as sent', () => {
    const two = mergeSettings(base, {
      conditions: ['genotype', 'treatment'],
      covariates: ['soma_um2'],
      reference: { genotype: 'WT' },
    })
    expect(two).toMatchObject({
      conditions: ['genotype', 'treatment'],
      covariates: ['soma_um2'],
      reference: { genotype: 'WT' },
    })
  })

  it('ignores the error bar, which is no longer a setting', () => {
    const sent = { reference: { treatment: 'vehicle' }, errorBar: 'sd' } as Parameters<
      typeof mergeSettings
    >[1]
    expect(mergeSettings(base, sent)).not.toHaveProperty('errorBar')
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
    const missing = issuesOf(() => mergeSettings(null, { conditions: ['treatment'] }))
    expect(missing.status).toBe(400)
    expect(missing.message).toContain('not tagged yet')
    expect(missing.details.issues.map((i) => i.path)).toEqual(['settings.response', 'settings.levels'])
    const twice = issuesOf(() => mergeSettings(base, { response: 'mouse' }))
    expect(twice.message).toContain('"mouse" is used twice')
    const covariateTwice = issuesOf(() => mergeSettings(base, { covariates: ['treatment'] }))
    expect(covariateTwice.message).toContain('"treatment" is used twice')
    const three = issuesOf(() => mergeSettings(base, { conditions: ['a', 'b', 'c'] }))
    expect(three.details.issues[0].path).toBe('settings.conditions')
  })
})

describe('checkSettingsAgainstColumns', () => {
  const columns = [
    column('lab'),
    column('mouse'),
    column('treatment'),
    column('genotype', {
      topValues: [
        { value: 'WT', count: 10 },
        { value: 'KO-3', count: 10 },
      ],
    }),
    column('neurite_um', { type: 'numeric', topValues: null, distinctCount: 900 }),
    column('soma_um2', { type: 'numeric', topValues: null, distinctCount: 900 }),
  ]

  it('accepts settings whose columns all exist, with a reference per factor', () => {
    const two = mergeSettings(base, {
      conditions: ['genotype', 'treatment'],
      covariates: ['soma_um2'],
      reference: { genotype: 'KO-3', treatment: 'NW-117' },
    })
    expect(() => checkSettingsAgainstColumns(two, columns, 1)).not.toThrow()
  })

  it('names every missing column with its place in the settings', () => {
    const problem = issuesOf(() =>
      checkSettingsAgainstColumns(
        mergeSettings(base, {
          levels: ['site', 'mouse'],
          conditions: ['treatment', 'diet'],
          covariates: ['age'],
        }),
        columns.slice(1),
        3,
      ),
    )
    expect(problem.message).toBe('Version 3 of this dataset has no column “diet”.')
    expect(problem.details.issues.map((i) => i.path)).toEqual([
      'settings.conditions.1',
      'settings.covariates.0',
      'settings.levels.0',
    ])
  })

  it('refuses an empty response or covariate and a reference that is not a label of its factor', () => {
    const empty = [
      ...columns.slice(0, 4),
      column('neurite_um', { type: 'empty' }),
      column('soma_um2', { type: 'empty' }),
    ]
    expect(issuesOf(() => checkSettingsAgainstColumns(base, empty, 1)).message).toContain('has no values')
    const covariate = issuesOf(() =>
      checkSettingsAgainstColumns(
        mergeSettings(base, { covariates: ['soma_um2'] }),
        [...columns.slice(0, 5), column('soma_um2', { type: 'empty' })],
        1,
      ),
    )
    expect(covariate.message).toBe('“soma_um2” cannot be a covariate: it has no values.')
    expect(covariate.details.issues[0].path).toBe('settings.covariates.0')
    const reference = issuesOf(() =>
      checkSettingsAgainstColumns(
        mergeSettings(base, { conditions: ['genotype', 'treatment'], reference: { genotype: 'wt' } }),
        columns,
        1,
      ),
    )
    expect(reference.message).toBe('“wt” is not a value of “genotype” (it has “WT”, “KO-3”).')
    expect(reference.details.issues[0].path).toBe('settings.reference.genotype')
  })
})

describe('knownLabels and labelsByColumn', () => {
  it('lists labels only when the profile holds all of them', () => {
    expect(knownLabels(column('treatment'))).toEqual(['vehicle', 'NW-117'])
    expect(knownLabels(column('treatment', { distinctCount: 3 }))).toBeNull()
    expect(knownLabels(column('treatment', { distinctCapped: true }))).toBeNull()
    expect(knownLabels(undefined)).toBeNull()
  })

  it('gives the labels of every text column whose profile knows them all, and no other column', () => {
    expect(
      labelsByColumn([
        column('treatment'),
        column('mouse', { distinctCount: 400, topValues: null }),
        column('dose', { type: 'integer' }),
      ]),
    ).toEqual({ treatment: ['vehicle', 'NW-117'] })
  })
})

describe('responseKinds', () => {
  it('offers two-valued text columns and 0/1 columns as yes/no, whole numbers of at least 0 as counts', () => {
    const number = (name: string, min: number, max: number, type: 'integer' | 'numeric' = 'integer') =>
      column(name, {
        type,
        min,
        max,
        distinctCount: max - min + 1,
        topValues: Array.from({ length: max - min + 1 }, (_, k) => ({ value: String(min + k), count: 3 })),
      })
    const kinds = responseKinds([
      column('treatment'),
      column('marker', {
        topValues: [
          { value: 'positive', count: 5 },
          { value: 'negative', count: 9 },
        ],
      }),
      column('lab', {
        distinctCount: 3,
        topValues: [
          { value: 'a', count: 1 },
          { value: 'b', count: 1 },
          { value: 'c', count: 1 },
        ],
      }),
      // A measurement with a note ("n.d."): two values, but not yes/no.
      column('soma_area', {
        topValues: [
          { value: '5', count: 4 },
          { value: 'n.d.', count: 2 },
        ],
      }),
      number('responding', 0, 1),
      number('puncta', 0, 14),
      number('offset', -2, 5),
      number('area_um2', 0, 1, 'numeric'),
    ])
    expect(kinds).toEqual({
      binaryColumns: {
        treatment: ['vehicle', 'NW-117'],
        marker: ['positive', 'negative'],
        responding: ['0', '1'],
      },
      countColumns: ['puncta'],
    })
  })
})
