import type { Request, Response } from 'express'
import { describe, expect, it, vi } from 'vitest'
import { z } from 'zod'
import { InvalidPayloadError } from '../errors/app-error'
import { validate } from './validate'

function fakeRequest(parts: { params?: unknown; query?: unknown; body?: unknown }): Request {
  const req = Object.create({
    // Express 5 defines query as a getter on the request prototype.
    get query() {
      return parts.query
    },
  }) as Request
  Object.assign(req, { params: parts.params ?? {}, body: parts.body })
  return req
}

const schemas = {
  params: z.object({ labId: z.coerce.number().int().positive() }),
  query: z.object({ page: z.coerce.number().int().min(1).default(1) }),
  body: z.object({ name: z.string().trim().min(1) }),
}

describe('validate', () => {
  it('replaces params, query and body with the parsed values', () => {
    const req = fakeRequest({ params: { labId: '4' }, query: {}, body: { name: '  Alder  ' } })
    const next = vi.fn()
    validate(schemas)(req, {} as Response, next)
    expect(next).toHaveBeenCalledOnce()
    expect(req.params).toEqual({ labId: 4 })
    expect(req.query).toEqual({ page: 1 })
    expect(req.body).toEqual({ name: 'Alder' })
  })

  it('reports every bad part at once, prefixing params and query paths', () => {
    const req = fakeRequest({ params: { labId: 'x' }, query: { page: '0' }, body: { name: ' ' } })
    let thrown: unknown
    try {
      validate(schemas)(req, {} as Response, vi.fn())
    } catch (err) {
      thrown = err
    }
    expect(thrown).toBeInstanceOf(InvalidPayloadError)
    const issues = (thrown as InvalidPayloadError).details as { issues: { path: string }[] }
    expect(issues.issues.map((i) => i.path)).toEqual(['params.labId', 'query.page', 'name'])
  })

  it('treats a missing body as invalid, not as a crash', () => {
    expect(() => validate({ body: schemas.body })(fakeRequest({}), {} as Response, vi.fn())).toThrow(
      InvalidPayloadError,
    )
  })
})
