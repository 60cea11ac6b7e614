import { describe, expect, it } from 'vitest'
import { AnalysisSettings } from '../schemas/analyses'
import { applySettingsChange } from './apply-settings-change'

// The settings rules of the product (common practice, no source).

const base = AnalysisSettings.parse({
  response: 'marker',
  levels: ['lab', 'mouse'],
  conditions: ['treatment'],
})

describe('applySettingsChange: response family', () => {
  it('reads settings without a family as a normal response, without trials or a yes value', () => {
    expect(base).toMatchObject({ family: 'gaussian', trials: null, positive: null })
  })

  it('keeps the yes value while the family stays binomial on the same response', () => {
    const binary = applySettingsChange(base, { family: 'binomial', positive: 'positive' })
    expect(binary).toMatchObject({ ok: true, settings: { family: 'binomial', positive: 'positive' } })
    if (!binary.ok) return
    const again = applySettingsChange(binary.settings, { conditions: [] })
    expect(again).toMatchObject({ ok: true, settings: { positive: 'positive' } })
    const otherResponse = applySettingsChange(binary.settings, { response: 'responding' })
    expect(otherResponse).toMatchObject({ ok: true, settings: { positive: null } })
    const counts = applySettingsChange(binary.settings, { family: 'poisson' })
    expect(counts).toMatchObject({ ok: true, settings: { family: 'poisson', positive: null } })
  })

  it('drops an inherited trials column when the family changes', () => {
    const aggregated = applySettingsChange(base, { family: 'binomial', trials: 'neurons' })
    expect(aggregated).toMatchObject({ ok: true, settings: { trials: 'neurons', positive: null } })
    if (!aggregated.ok) return
    expect(applySettingsChange(aggregated.settings, { family: 'gaussian' })).toMatchObject({
      ok: true,
      settings: { family: 'gaussian', trials: null },
    })
  })

  it('reports a change that contradicts itself', () => {
    expect(applySettingsChange(base, { family: 'poisson', trials: 'neurons' })).toEqual({
      ok: false,
      problems: [
        { path: 'trials', message: 'A trials column needs the binomial family (successes out of trials)' },
      ],
    })
    expect(applySettingsChange(base, { family: 'binomial', trials: 'neurons', positive: 'yes' })).toEqual({
      ok: false,
      problems: [{ path: 'positive', message: 'Only a yes/no response has a value counted as yes' }],
    })
  })

  it('gives the trials column one role, and keeps the bootstrap off with trials', () => {
    const twice = applySettingsChange(base, { family: 'binomial', trials: 'mouse' })
    expect(twice).toMatchObject({
      ok: false,
      problems: [{ message: '"mouse" is used twice; each column can have one role' }],
    })
    const boot = applySettingsChange(base, { family: 'binomial', trials: 'n', bootstrap: { enabled: true } })
    expect(boot).toMatchObject({ ok: false, problems: [{ path: 'bootstrap.enabled' }] })
  })
})
