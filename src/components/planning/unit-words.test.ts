import { describe, expect, it } from 'vitest'
import { pluralOf } from './unit-words'

describe('pluralOf', () => {
  it('knows the level names of the demo and common English endings', () => {
    expect(['mouse', 'Mouse', 'plate', 'day', 'patch', 'culture', 'colony', 'lab'].map(pluralOf)).toEqual([
      'mice',
      'Mice',
      'plates',
      'days',
      'patches',
      'cultures',
      'colonies',
      'labs',
    ])
  })
})
