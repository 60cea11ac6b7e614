import { describe, expect, it } from 'vitest'
import { z } from 'zod'
import { ForbiddenError, NotFoundError } from './app-error'
import { translateError } from './translate-error'

// Shapes of node-postgres errors as the driver raises them (fields from pg's DatabaseError).
function pgError(code: string, extra: Record<string, unknown> = {}) {
  return Object.assign(new Error('pg says no'), { code, severity: 'ERROR', ...extra })
}

describe('translateError', () => {
  it('passes AppErrors through unchanged', () => {
    const err = new ForbiddenError('Only PIs may do this.')
    expect(translateError(err)).toBe(err)
    expect(translateError(new NotFoundError()).status).toBe(404)
  })

  it('turns a zod error into 400 INVALID_PAYLOAD with one issue per field path', () => {
    const schema = z.object({ email: z.email(), nested: z.object({ n: z.number() }) })
    const result = schema.safeParse({ email: 'x', nested: { n: 'y' } })
    const err = translateError(result.error)
    expect(err.status).toBe(400)
    expect(err.code).toBe('INVALID_PAYLOAD')
    const issues = (err.details as { issues: { path: string }[] }).issues
    expect(issues.map((i) => i.path).sort()).toEqual(['email', 'nested.n'])
  })

  it('turns a unique violation into 409 CONFLICT naming the constraint', () => {
    const err = translateError(pgError('23505', { constraint: 'users_email_unique' }))
    expect(err.status).toBe(409)
    expect(err.code).toBe('CONFLICT')
    expect(err.details).toEqual({ constraint: 'users_email_unique' })
  })

  it('turns a foreign key violation into 409 and a check violation into 400', () => {
    expect(translateError(pgError('23503')).status).toBe(409)
    expect(translateError(pgError('23514')).code).toBe('INVALID_PAYLOAD')
    expect(translateError(pgError('22P02')).status).toBe(400)
  })

  it('does not mistake a Node system error code for a SQLSTATE', () => {
    const err = translateError(Object.assign(new Error('connect ECONNREFUSED'), { code: 'ECONNREFUSED' }))
    expect(err.status).toBe(500)
    expect(err.code).toBe('INTERNAL')
  })

  it('maps body-parser failures: bad JSON to 400, oversized body to 413', () => {
    const badJson = Object.assign(new SyntaxError('Unexpected token'), {
      status: 400,
      type: 'entity.parse.failed',
      expose: true,
    })
    expect(translateError(badJson).code).toBe('INVALID_PAYLOAD')
    const tooLarge = Object.assign(new Error('request entity too large'), {
      status: 413,
      type: 'entity.too.large',
      expose: true,
    })
    expect(translateError(tooLarge).code).toBe('PAYLOAD_TOO_LARGE')
  })

  it('maps multer limits: file size to 413, other upload errors to 400', () => {
    const size = Object.assign(new Error('File too large'), { name: 'MulterError', code: 'LIMIT_FILE_SIZE' })
    expect(translateError(size).status).toBe(413)
    const field = Object.assign(new Error('Unexpected field'), {
      name: 'MulterError',
      code: 'LIMIT_UNEXPECTED_FILE',
    })
    expect(translateError(field).status).toBe(400)
  })

  it('hides unknown errors behind 500 INTERNAL without their message', () => {
    const err = translateError(new TypeError('secret internals: cannot read x of undefined'))
    expect(err.status).toBe(500)
    expect(err.message).not.toContain('secret')
    expect(translateError('a thrown string').code).toBe('INTERNAL')
  })
})
