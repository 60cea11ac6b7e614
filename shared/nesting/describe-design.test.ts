import { describe, expect, it } from 'vitest'
import { describeDesign } from './describe-design'
import type { CodedColumn } from './unit-paths'

const column = (name: string, codes: number[], labels: string[]): CodedColumn => ({
  name,
  codes: Int32Array.from(codes),
  labels,
})

describe('describeDesign: where the condition varies', () => {
  it('calls animals assigned to conditions in one lab the usual design, without alarm', () => {
    // Invented: four mice, two rows each, two per treatment.
    const mouse = column('mouse', [0, 0, 1, 1, 2, 2, 3, 3], ['m1', 'm2', 'm3', 'm4'])
    const treatment = column('treatment', [0, 0, 1, 1, 0, 0, 1, 1], ['vehicle', 'NW-117'])
    const facts = describeDesign({ rowCount: 8, levels: [mouse], condition: treatment })
    const sentence = facts.explanation[facts.explanation.length - 1]
    expect(sentence).toContain('This is the usual design.')
    expect(sentence).not.toMatch(/cannot be (told apart|separated)/)
  })

  it('says plainly when the outermost level carries the condition over the units inside it', () => {
    // Invented: two labs, each ran one treatment, two mice per lab.
    const lab = column('lab', [0, 0, 0, 0, 1, 1, 1, 1], ['Nimbus', 'Fernhill'])
    const mouse = column('mouse', [0, 0, 1, 1, 0, 0, 1, 1], ['m1', 'm2'])
    const treatment = column('treatment', [0, 0, 0, 0, 1, 1, 1, 1], ['vehicle', 'NW-117'])
    const facts = describeDesign({ rowCount: 8, levels: [lab, mouse], condition: treatment })
    expect(facts.explanation[facts.explanation.length - 1]).toContain(
      '“lab” differences and the “treatment” effect cannot be separated',
    )
  })
})
