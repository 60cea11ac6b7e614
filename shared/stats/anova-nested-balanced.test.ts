import { describe, expect, it } from 'vitest'
import { anovaNestedBalanced } from './anova-nested-balanced'
import { EngineInputError } from './engine-input-error'
import { fitNestedReml } from './fit-nested-reml'
import { dyestuff } from './fixtures/dyestuff'
import { dyestuff2 } from './fixtures/dyestuff2'
import { machines } from './fixtures/machines'
import { nestedColumnsFromTable } from './fixtures/nested-columns-from-table'
import { pastes } from './fixtures/pastes'
import { prepareNestedDesign } from './prepare-nested-design'

describe('anovaNestedBalanced', () => {
  it('reproduces the Pastes nested ANOVA table and equals REML', () => {
    // Pastes, R anova(lm(strength ~ batch/cask)): MS batch 27.489185 (df 9), batch:cask 17.545333
    // (df 20), residual 0.678 (df 30). lme4 REML: 1.657, 8.434, 0.678 (no estimate truncated).
    const design = prepareNestedDesign(nestedColumnsFromTable(pastes, 'strength', ['batch', 'cask']))
    const a = anovaNestedBalanced(design)!
    expect(a.table.map((l) => l.df)).toEqual([9, 20, 30])
    expect(a.table[0].meanSquare).toBeCloseTo(27.489185, 6)
    expect(a.table[1].meanSquare).toBeCloseTo(17.545333, 6)
    expect(a.table[2].meanSquare).toBeCloseTo(0.678, 9)
    expect(a.table.map((l) => l.unitSize)).toEqual([6, 2, 1])
    expect(a.anyNegative).toBe(false)
    const reml = fitNestedReml(design)
    a.components.forEach((c, i) => expect(reml.components[i].variance / c.variance).toBeCloseTo(1, 7))
  })

  it('gives the published Dyestuff mean squares and equals REML', () => {
    // Dyestuff (Davies & Goldsmith 1972): MSB 11271.5, MSW 2451.25, σ_b² 1764.05.
    const design = prepareNestedDesign(nestedColumnsFromTable(dyestuff, 'Yield', ['Batch']))
    const a = anovaNestedBalanced(design)!
    expect(a.table[0].meanSquare).toBeCloseTo(11271.5, 8)
    expect(a.table[1].meanSquare).toBeCloseTo(2451.25, 8)
    expect(a.components[0].variance).toBeCloseTo(1764.05, 8)
    expect(fitNestedReml(design).components[0].variance / 1764.05).toBeCloseTo(1, 7)
  })

  it('reports a negative estimate where REML truncates at 0 (Dyestuff2)', () => {
    // Dyestuff2 (Box & Tiao 1973): MSB < MSW, so the moment estimate is negative; lme4 REML gives 0.
    const design = prepareNestedDesign(nestedColumnsFromTable(dyestuff2, 'Yield', ['Batch']))
    const a = anovaNestedBalanced(design)!
    expect(a.anyNegative).toBe(true)
    expect(a.components[0].variance).toBeLessThan(0)
  })

  it('returns null on unbalanced data and guards against a condition', () => {
    const cols = nestedColumnsFromTable(pastes, 'strength', ['batch', 'cask'])
    cols.response[0] = NaN
    expect(anovaNestedBalanced(prepareNestedDesign(cols))).toBeNull()
    const withCondition = prepareNestedDesign(
      nestedColumnsFromTable(machines, 'score', ['Worker'], 'Machine'),
    )
    expect(() => anovaNestedBalanced(withCondition)).toThrow(EngineInputError)
    expect(() => anovaNestedBalanced(withCondition)).toThrow(/without condition/)
  })
})
