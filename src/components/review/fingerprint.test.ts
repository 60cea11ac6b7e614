import { describe, expect, it } from 'vitest'
import { fingerprintGroups, shortFingerprint } from './fingerprint'

describe('fingerprint', () => {
  const hash = '3f2a9c017be4d5aa0c61f0e2b7d8c9a1e2f3a4b5c6d7e8f90123456789abcdef'
  it('shows a SHA-256 in eight groups of eight characters', () => {
    expect(fingerprintGroups(hash).split(' ')).toHaveLength(8)
    expect(fingerprintGroups(hash).replaceAll(' ', '')).toBe(hash)
  })
  it('names it by its first twelve characters in running text', () => {
    expect(shortFingerprint(hash)).toBe('3f2a9c017be4')
  })
})
