import { describe, expect, it } from 'vitest'
import { canonicalJson } from './canonical-json'

// Expected texts are written out by hand from the rule "keys sorted, no whitespace" (common practice, no source).
describe('canonicalJson', () => {
  it('sorts keys at every depth and keeps array order', () => {
    expect(canonicalJson({ b: 1, a: [true, { d: null, c: 'x' }] })).toBe(
      '{"a":[true,{"c":"x","d":null}],"b":1}',
    )
  })

  it('gives the same text for the same value in another key order', () => {
    expect(canonicalJson({ x: { q: 2, p: 1 }, w: 0.1 })).toBe(canonicalJson({ w: 0.1, x: { p: 1, q: 2 } }))
  })

  it('leaves out undefined properties like JSON.stringify', () => {
    expect(canonicalJson({ a: undefined, b: 'é"' })).toBe('{"b":"é\\""}')
  })

  it('refuses non-finite numbers', () => {
    expect(() => canonicalJson({ a: Number.NaN })).toThrow(/non-finite/)
  })
})
