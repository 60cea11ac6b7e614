import { describe, expect, it } from 'vitest'
import { bootstrapForResult } from './bootstrap-for-result'
import { EngineInputError } from '../stats/engine-input-error'
import { hierarchicalBootstrap, type BootstrapInput } from '../stats/hierarchical-bootstrap'

// Invented: 4 mice (2 on vehicle, 2 on NW-117), 3 neurons each, neurite length in µm.
const y = [10, 12, 14, 11, 13, 15, 20, 22, 24, 21, 23, 25]
const mouseOfObs = [0, 0, 0, 1, 1, 1, 2, 2, 2, 3, 3, 3]
const conditionOfObs = [0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 1, 1]

function design(withCondition: boolean): BootstrapInput {
  return {
    y: Float64Array.from(y),
    randomLevels: [
      { nUnits: 4, unitOfObs: Int32Array.from(mouseOfObs), parentOfUnit: new Int32Array(4).fill(-1) },
    ],
    condition: withCondition
      ? { labels: ['vehicle', 'NW-117'], codes: Int32Array.from(conditionOfObs) }
      : null,
  }
}

const settings = { resamples: 200, seed: 'mapping-1', confidence: 0.9 }

describe('bootstrapForResult', () => {
  it('reports the bootstrap’s conditions and differences under the result’s field names', () => {
    // No statistical source needed: the check is that nothing is lost or mixed up in the renaming.
    const boot = hierarchicalBootstrap(design(true), { ...settings, pairs: [[1, 0]] })
    const section = bootstrapForResult(design(true), [{ a: 'NW-117', b: 'vehicle' }], settings)
    expect(section).toMatchObject({
      resamples: 200,
      seed: 'mapping-1',
      confidence: 0.9,
      exactBelow: boot.exactBelow,
      approximatedGroups: boot.approximatedGroups,
      innermostGroups: boot.innermostGroups,
    })
    expect(section.groups.map((g) => [g.condition, g.estimate, g.se, g.ciLow, g.ciHigh])).toEqual(
      boot.conditions.map((c) => [c.label, c.observed, c.se, ...c.ci]),
    )
    expect(section.contrasts.map((c) => [c.a, c.b, c.estimate, c.se, c.ciLow, c.ciHigh, c.p])).toEqual(
      boot.differences.map((d) => [d.a, d.b, d.observed, d.se, ...d.ci, d.pBootstrap]),
    )
    expect(section.contrasts.map((c) => [c.a, c.b])).toEqual([['NW-117', 'vehicle']])
  })

  it('orients each contrast by its labels, a − b', () => {
    // Common practice, no source: hand-computed condition means 12.5 (vehicle) and 22.5 (NW-117).
    const forward = bootstrapForResult(design(true), [{ a: 'NW-117', b: 'vehicle' }], settings)
    const backward = bootstrapForResult(design(true), [{ a: 'vehicle', b: 'NW-117' }], settings)
    expect(forward.groups.map((g) => [g.condition, g.estimate])).toEqual([
      ['vehicle', 12.5],
      ['NW-117', 22.5],
    ])
    expect(forward.contrasts[0].estimate).toBeCloseTo(10, 12)
    expect(backward.contrasts[0]).toMatchObject({ a: 'vehicle', b: 'NW-117' })
    expect(backward.contrasts[0].estimate).toBeCloseTo(-10, 12)
  })

  it('calls the one group "all" when the design has no condition', () => {
    // Common practice, no source: hand-computed mean of the 12 observations, 210 / 12.
    const section = bootstrapForResult(design(false), [], settings)
    expect(section.groups).toHaveLength(1)
    expect(section.groups[0].condition).toBe('all')
    expect(section.groups[0].estimate).toBeCloseTo(17.5, 12)
    expect(section.contrasts).toEqual([])
  })

  it('rejects a contrast label the design does not have', () => {
    expect(() => bootstrapForResult(design(true), [{ a: 'NW-118', b: 'vehicle' }], settings)).toThrow(
      EngineInputError,
    )
  })
})
