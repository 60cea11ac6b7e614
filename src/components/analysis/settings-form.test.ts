import { describe, expect, it } from 'vitest'
import { AnalysisSettings } from '../../../shared/schemas/analyses'
import { applySettingsChange } from '../../../shared/analysis/apply-settings-change'
import {
  checkDraft,
  columnChoices,
  draftFrom,
  draftToChange,
  familySuggestion,
  labelsOf,
  responseChoices,
  withFamily,
  withResponse,
  type FormDefaults,
} from './settings-form'

// An invented genotype × treatment table: the column roles and labels below are the test's own.
const tagged = AnalysisSettings.parse({
  response: 'length',
  conditions: ['treatment'],
  levels: ['lab', 'mouse'],
  reference: { treatment: 'vehicle' },
})
const defaults: FormDefaults = {
  columns: ['length', 'soma_area', 'treatment', 'genotype', 'lab', 'mouse', 'note'],
  numericColumns: ['length', 'soma_area'],
  labelsByColumn: { treatment: ['vehicle', 'KX-9'], genotype: ['WT', 'KO'] },
}

describe('settings form check', () => {
  it('accepts the defaults from the tagging', () => {
    const check = checkDraft(draftFrom(tagged), defaults)
    expect(check.ok && check.settings).toEqual(tagged)
  })

  it('sends two conditions, a covariate and a reference per factor in the new settings shape', () => {
    const draft = {
      ...draftFrom(tagged),
      conditions: ['genotype', 'treatment'],
      covariates: ['soma_area'],
      reference: { genotype: 'KO', treatment: 'vehicle' },
    }
    const check = checkDraft(draft, defaults)
    expect(check.ok).toBe(true)
    if (check.ok) {
      expect(check.settings.conditions).toEqual(['genotype', 'treatment'])
      expect(check.settings.covariates).toEqual(['soma_area'])
      expect(check.settings.reference).toEqual({ genotype: 'KO', treatment: 'vehicle' })
      expect(check.settings).not.toHaveProperty('errorBar')
    }
  })

  it('gives the same verdict as applySettingsChange, the function the server uses', () => {
    const draft = { ...draftFrom(tagged), conditions: ['genotype', 'treatment', 'note'] }
    const server = applySettingsChange(null, draftToChange(draft))
    const form = checkDraft(draft, defaults)
    expect(server.ok).toBe(false)
    expect(form.ok).toBe(false)
    if (!server.ok && !form.ok) expect(form.problems.conditions).toBe(server.problems[0].message)
  })

  it('asks for a response and at least one level, by field', () => {
    const check = checkDraft(draftFrom(null), defaults)
    expect(check.ok).toBe(false)
    if (!check.ok) {
      expect(check.problems.response).toBe('Choose the response column')
      const noLevels = checkDraft({ ...draftFrom(tagged), levels: [] }, defaults)
      expect(!noLevels.ok && noLevels.problems.levels).toBe('Pick at least one nesting level')
    }
  })

  it('refuses a column used twice and resamples out of range, with the schema’s words', () => {
    const draft = { ...draftFrom(tagged), levels: ['treatment'], bootstrapEnabled: true, resamples: 5 }
    const check = checkDraft(draft, defaults)
    expect(check.ok).toBe(false)
    if (!check.ok) {
      expect(check.problems.form).toContain('"treatment" is used twice')
      expect(check.problems['bootstrap.resamples']).toBe('Use at least 100 resamples')
    }
  })

  it('asks for the resamples when the field is left empty', () => {
    const check = checkDraft({ ...draftFrom(tagged), bootstrapEnabled: true, resamples: null }, defaults)
    expect(!check.ok && check.problems['bootstrap.resamples']).toBe('Give the number of resamples')
  })

  it('refuses a response or covariate without numbers', () => {
    const response = checkDraft({ ...draftFrom(tagged), response: 'note' }, defaults)
    expect(!response.ok && response.problems.response).toContain('holds no numbers')
    const covariate = checkDraft({ ...draftFrom(tagged), covariates: ['genotype'] }, defaults)
    expect(!covariate.ok && covariate.problems.covariates).toContain('“genotype” holds no numbers')
  })

  it('puts a reference that is not one of the known labels on that factor’s field', () => {
    const draft = { ...draftFrom(tagged), reference: { treatment: 'placebo' } }
    const check = checkDraft(draft, defaults)
    expect(!check.ok && check.problems['reference.treatment']).toBe('“placebo” is not a value of “treatment”')
  })

  it('drops the reference of a factor that is no longer a condition, and empty references', () => {
    const draft = { ...draftFrom(tagged), conditions: [], reference: { treatment: 'vehicle', genotype: '' } }
    const check = checkDraft(draft, defaults)
    expect(check.ok && check.settings.reference).toEqual({})
  })
})

describe('column choices', () => {
  it('offers only numeric columns as covariates, never the response, a level or a condition', () => {
    const choices = columnChoices(defaults, { ...draftFrom(tagged), covariates: [] })
    expect(choices.covariates).toEqual(['soma_area'])
    expect(choices.conditions).not.toContain('lab')
    expect(choices.levels).not.toContain('treatment')
  })

  it('falls back to no labels (a free-text reference) when a column’s labels are unknown', () => {
    expect(labelsOf(defaults, 'genotype')).toEqual(['WT', 'KO'])
    expect(labelsOf(defaults, 'note')).toEqual([])
    expect(labelsOf({ columns: [], numericColumns: [] }, 'genotype')).toEqual([])
  })
})

describe('settings form: the kind of response', () => {
  // Invented neurons table: a yes/no marker, a count of puncta, a measured length.
  const neurons: FormDefaults = {
    columns: ['lab', 'mouse', 'treatment', 'marker', 'puncta', 'length', 'neurons_counted'],
    numericColumns: ['puncta', 'length', 'neurons_counted'],
    labelsByColumn: { treatment: ['vehicle', 'QZ-41'], marker: ['negative', 'positive'] },
    binaryColumns: { treatment: ['vehicle', 'QZ-41'], marker: ['negative', 'positive'] },
    countColumns: ['puncta', 'neurons_counted'],
  }
  const start = { ...draftFrom(null), levels: ['lab', 'mouse'], conditions: ['treatment'] }

  it('offers numbers and two-valued columns as the response, and suggests a kind from the values', () => {
    expect(responseChoices(neurons)).toEqual(['treatment', 'marker', 'puncta', 'length', 'neurons_counted'])
    expect(familySuggestion(neurons, 'marker')).toEqual({
      family: 'binomial',
      values: ['negative', 'positive'],
      positive: 'positive',
    })
    expect(familySuggestion(neurons, 'puncta')).toEqual({ family: 'poisson' })
    expect(familySuggestion(neurons, 'length')).toBeNull()
  })

  it('keeps a measurement until the person confirms yes/no, then picks the suggested yes value', () => {
    const picked = withResponse(start, neurons, 'marker')
    expect(picked.family).toBe('gaussian')
    expect(checkDraft(picked, neurons)).toMatchObject({
      ok: false,
      problems: { response: '“marker” holds two values, not numbers: analyse it as yes/no' },
    })
    const confirmed = withFamily(picked, neurons, 'binomial')
    expect(confirmed).toMatchObject({ family: 'binomial', positive: 'positive', trials: null })
    const check = checkDraft(confirmed, neurons)
    expect(check.ok && check.settings).toMatchObject({
      family: 'binomial',
      positive: 'positive',
      trials: null,
    })
  })

  it('starts a new response from its own values, and drops a kind it cannot be', () => {
    const yesNo = withFamily(withResponse(start, neurons, 'marker'), neurons, 'binomial')
    expect(withResponse(yesNo, neurons, 'length')).toMatchObject({ family: 'gaussian', positive: null })
    const counts = withFamily(withResponse(start, neurons, 'puncta'), neurons, 'poisson')
    expect(withResponse(counts, neurons, 'neurons_counted')).toMatchObject({ family: 'poisson' })
  })

  it('sends successes out of trials without a yes value, and with the bootstrap off', () => {
    const aggregated = {
      ...withFamily(withResponse(start, neurons, 'puncta'), neurons, 'binomial'),
      trials: 'neurons_counted',
      bootstrapEnabled: true,
    }
    expect(draftToChange(aggregated)).toMatchObject({
      family: 'binomial',
      trials: 'neurons_counted',
      positive: null,
      bootstrap: { enabled: false },
    })
    expect(checkDraft({ ...aggregated, trials: '' }, neurons)).toMatchObject({
      ok: false,
      problems: { trials: 'Choose the trials column' },
    })
    expect(columnChoices(neurons, aggregated).trials).toEqual(['length', 'neurons_counted'])
  })

  it('reads stored settings without a family as a measurement', () => {
    expect(draftFrom(tagged)).toMatchObject({ family: 'gaussian', trials: null, positive: null })
  })
})
