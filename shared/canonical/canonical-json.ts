/**
 * JSON with object keys sorted at every depth and no whitespace, so the same value always gives
 * the same text whatever order its keys were stored in (PostgreSQL's jsonb reorders keys).
 * Undefined properties are left out, as JSON.stringify does; non-finite numbers are refused
 * because JSON has no spelling for them.
 *
 * @example canonicalJson({ b: 1, a: [true, { d: null, c: 'x' }] }) === '{"a":[true,{"c":"x","d":null}],"b":1}'
 */
export function canonicalJson(value: unknown): string {
  if (value === null) return 'null'
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new Error('canonicalJson cannot encode a non-finite number')
    return JSON.stringify(value)
  }
  if (typeof value === 'string' || typeof value === 'boolean') return JSON.stringify(value)
  if (Array.isArray(value))
    return `[${value.map((v) => (v === undefined ? 'null' : canonicalJson(v))).join(',')}]`
  if (typeof value === 'object') {
    const entries = Object.keys(value as Record<string, unknown>)
      .filter((k) => (value as Record<string, unknown>)[k] !== undefined)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonicalJson((value as Record<string, unknown>)[k])}`)
    return `{${entries.join(',')}}`
  }
  throw new Error(`canonicalJson cannot encode a ${typeof value}`)
}
