import type { RequestHandler } from 'express'
import type { ZodType } from 'zod'
import { InvalidPayloadError } from '../errors/app-error'
import { zodIssues, type FieldIssue } from '../errors/translate-error'

export interface RequestSchemas {
  params?: ZodType
  query?: ZodType
  body?: ZodType
}

/**
 * Parses params, query and body with the shared zod schemas and replaces them with the parsed
 * (coerced, trimmed) values. All problems are reported at once: body issues by field path
 * ('email'), params and query issues prefixed ('params.labId', 'query.page').
 */
export function validate(schemas: RequestSchemas): RequestHandler {
  return (req, _res, next) => {
    const issues: FieldIssue[] = []
    const parsed: { params?: unknown; query?: unknown; body?: unknown } = {}
    for (const part of ['params', 'query', 'body'] as const) {
      const schema = schemas[part]
      if (!schema) continue
      const result = schema.safeParse(req[part])
      if (result.success) parsed[part] = result.data
      else {
        const prefix = part === 'body' ? '' : part
        for (const issue of zodIssues(result.error)) {
          issues.push({ ...issue, path: [prefix, issue.path].filter(Boolean).join('.') })
        }
      }
    }
    if (issues.length) throw new InvalidPayloadError('Some fields are not valid.', { issues })
    if ('params' in parsed) req.params = parsed.params as typeof req.params
    // Express 5 exposes req.query through a getter; shadow it on this request with the parsed value.
    if ('query' in parsed)
      Object.defineProperty(req, 'query', {
        value: parsed.query,
        writable: true,
        configurable: true,
        enumerable: true,
      })
    if ('body' in parsed) req.body = parsed.body
    next()
  }
}
