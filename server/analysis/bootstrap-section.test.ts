import { describe, expect, it } from 'vitest'
import { analyzeNested } from '../../shared/stats/analyze-nested'
import type { NestedColumns } from '../../shared/stats/types'
import { bootstrapSection } from './bootstrap-section'

// Invented: 3 labs × 4 mice, condition per mouse in two designs, 5–9 neurons per mouse.
function columns(conditions: string[]): NestedColumns {
  const lab: number[] = []
  const mouse: number[] = []
  const cond: number[] = []
  const y: number[] = []
  for (let l = 0; l < 3; l++)
    for (let m = 0; m < 4; m++)
      for (let c = 0; c < 5 + ((l + m) % 5); c++) {
        lab.push(l)
        mouse.push(m)
        cond.push(m % conditions.length)
        y.push(50 + l * 3 + m + ((c * 7) % 5) + (m % conditions.length) * 2)
      }
  return {
    responseName: 'neurite_um',
    response: Float64Array.from(y),
    levels: [
      { name: 'lab', labels: ['A', 'B', 'C'], codes: Int32Array.from(lab) },
      { name: 'mouse', labels: ['m1', 'm2', 'm3', 'm4'], codes: Int32Array.from(mouse) },
    ],
    condition: { name: 'treatment', labels: conditions, codes: Int32Array.from(cond) },
  }
}

describe('bootstrapSection', () => {
  // The check is against the engine itself: the stage-by-stage run must equal analyzeNested's own bootstrap.
  it.each([
    [['vehicle', 'NW-117'], 'NW-117'],
    [['vehicle', 'low', 'high', 'max'], 'low'],
  ])('equals analyzeNested’s bootstrap for %j (reference %s)', (labels, reference) => {
    const data = columns(labels)
    const settings = { resamples: 300, seed: 'check-7' }
    const whole = analyzeNested(data, { reference, bootstrap: settings })
    const plain = analyzeNested(data, { reference })
    expect(bootstrapSection(data, plain, settings)).toEqual(whole.comparisons.bootstrap)
  })
})
