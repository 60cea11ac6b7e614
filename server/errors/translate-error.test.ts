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

  it('answers 503 with a retry time when the database cannot be reached', () => {
    const refused = translateError(
      Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:54329'), { code: 'ECONNREFUSED' }),
    )
    expect(refused).toMatchObject({ status: 503, code: 'SERVICE_UNAVAILABLE', retryAfterSeconds: 5 })
    expect(refused.message).toBe('Nestwise cannot reach its database just now. Try again in a few seconds.')
    // PostgreSQL shutting down (57P01), starting up (57P03), a broken connection (08006), too many clients (53300).
    for (const code of ['57P01', '57P03', '08006', '53300'])
      expect(translateError(pgError(code)).status, code).toBe(503)
    expect(translateError(new Error('Connection terminated unexpectedly')).status).toBe(503)
    expect(
      translateError(
        Object.assign(new Error('Knex: Timeout acquiring a connection.'), { name: 'KnexTimeoutError' }),
      ).status,
    ).toBe(503)
  })

  it('keeps other database errors apart from an outage', () => {
    expect(translateError(pgError('42P01')).status).toBe(500)
    expect(translateError(pgError('23505')).status).toBe(409)
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
