import { describe, expect, it } from 'vitest'
import { EngineInputError } from '../../shared/stats/engine-input-error'
import { InvalidPayloadError, UnprocessableError } from '../errors/app-error'
import { classifyRunError } from './classify-run-error'

describe('classifyRunError', () => {
  it('keeps the engine’s own words for a design it refuses, naming the columns', () => {
    const refused = new EngineInputError(
      'The conditions "genotype" and "lab" cannot be told apart: each genotype was measured in one lab only.',
      'genotype',
    )
    expect(classifyRunError(refused)).toEqual({
      code: 'UNPROCESSABLE',
      message: refused.message,
      details: { column: 'genotype' },
    })
    expect(classifyRunError(new EngineInputError('Two condition factors are not supported yet.'))).toEqual({
      code: 'UNPROCESSABLE',
      message: 'Two condition factors are not supported yet.',
    })
  })

  it('passes on a read-back refusal with its row and column', () => {
    const row = new UnprocessableError('Row 12 of “soma_area_um2” holds “n.d.”, which is not a number.', {
      column: 'soma_area_um2',
      row: 12,
    })
    expect(classifyRunError(row)).toEqual({
      code: 'UNPROCESSABLE',
      message: row.message,
      details: { column: 'soma_area_um2', row: 12 },
    })
    expect(classifyRunError(new InvalidPayloadError('bad')).code).toBe('UNPROCESSABLE')
  })

  it('hides anything else behind a plain sentence', () => {
    const internal = classifyRunError(new TypeError('x is undefined'))
    expect(internal.code).toBe('INTERNAL')
    expect(internal.message).not.toContain('undefined')
  })
})
