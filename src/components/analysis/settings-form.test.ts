import { describe, expect, it } from 'vitest'
import type { AnalysisDefaults } from '../../../shared/schemas/analyses'
import { checkDraft, draftFrom } from './settings-form'

const defaults: AnalysisDefaults = {
  datasetVersion: { id: 1, versionNo: 1 },
  settings: {
    response: 'length',
    condition: 'treatment',
    levels: ['mouse'],
    reference: null,
    errorBar: 'sem',
    bootstrap: { enabled: false, resamples: 2000, seed: '1' },
  },
  columns: ['length', 'treatment', 'mouse', 'note'],
  numericColumns: ['length'],
  conditionLabels: ['vehicle', 'NW-117'],
}

describe('settings form check', () => {
  it('accepts the defaults from the tagging', () => {
    const check = checkDraft(draftFrom(defaults.settings), defaults)
    expect(check.ok).toBe(true)
  })

  it('asks for a response and at least one level', () => {
    const check = checkDraft({ ...draftFrom(null) }, defaults)
    expect(check.ok).toBe(false)
    if (!check.ok) {
      expect(check.problems.response).toBe('Pick the measured column')
      expect(check.problems.levels).toBe('Pick at least one nesting level')
    }
  })

  it('refuses a column used twice and resamples out of range, with the schema’s words', () => {
    const draft = {
      ...draftFrom(defaults.settings),
      levels: ['treatment'],
      bootstrapEnabled: true,
      resamples: 5,
    }
    const check = checkDraft(draft, defaults)
    expect(check.ok).toBe(false)
    if (!check.ok) {
      expect(check.problems.form).toContain('"treatment" is used twice')
      expect(check.problems['bootstrap.resamples']).toBe('Use at least 100 resamples')
    }
  })

  it('refuses a response column without numbers', () => {
    const check = checkDraft({ ...draftFrom(defaults.settings), response: 'note' }, defaults)
    expect(check.ok).toBe(false)
    if (!check.ok) expect(check.problems.response).toContain('holds no numbers')
  })

  it('drops the reference when there is no condition', () => {
    const check = checkDraft(
      { ...draftFrom(defaults.settings), condition: null, reference: 'vehicle' },
      defaults,
    )
    expect(check.ok && check.settings.reference).toBeNull()
  })
})
