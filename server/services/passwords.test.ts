import { describe, expect, it } from 'vitest'
import { hashPassword, verifyPassword } from './passwords'

// Small cost parameters keep these tests fast; the format and comparison are what is under test.
const FAST = { N: 2 ** 10, r: 8, p: 1 }

describe('password hashing', () => {
  it('verifies the right password and rejects a wrong one', async () => {
    const stored = await hashPassword('correct horse', FAST)
    expect(await verifyPassword('correct horse', stored)).toBe(true)
    expect(await verifyPassword('correct hors', stored)).toBe(false)
    expect(await verifyPassword('', stored)).toBe(false)
  })

  it('salts: the same password hashes differently each time', async () => {
    const a = await hashPassword('same', FAST)
    const b = await hashPassword('same', FAST)
    expect(a).not.toBe(b)
    expect(await verifyPassword('same', a)).toBe(true)
    expect(await verifyPassword('same', b)).toBe(true)
  })

  it('stores its parameters with the hash and verifies with those, not the defaults', async () => {
    const stored = await hashPassword('pw', FAST)
    const [scheme, N, r, p, salt, key] = stored.split('$')
    expect([scheme, N, r, p]).toEqual(['scrypt', '1024', '8', '1'])
    expect(Buffer.from(salt, 'base64')).toHaveLength(16)
    expect(Buffer.from(key, 'base64')).toHaveLength(64)
    expect(await verifyPassword('pw', stored)).toBe(true)
  })

  it('uses a real cost by default (N = 2^15, r = 8, p = 3)', async () => {
    const stored = await hashPassword('pw')
    expect(stored.startsWith('scrypt$32768$8$3$')).toBe(true)
    expect(await verifyPassword('pw', stored)).toBe(true)
  })

  it('never matches malformed or tampered stored values', async () => {
    const stored = await hashPassword('pw', FAST)
    const parts = stored.split('$')
    expect(await verifyPassword('pw', 'plain-text-password')).toBe(false)
    expect(await verifyPassword('pw', parts.slice(0, 5).join('$'))).toBe(false)
    expect(await verifyPassword('pw', ['bcrypt', ...parts.slice(1)].join('$'))).toBe(false)
    // N not a power of two, and N far beyond what we allow
    expect(await verifyPassword('pw', ['scrypt', '1000', ...parts.slice(2)].join('$'))).toBe(false)
    expect(await verifyPassword('pw', ['scrypt', String(2 ** 24), ...parts.slice(2)].join('$'))).toBe(false)
    // a flipped hash byte
    const key = Buffer.from(parts[5], 'base64')
    key[0] ^= 1
    expect(await verifyPassword('pw', [...parts.slice(0, 5), key.toString('base64')].join('$'))).toBe(false)
  })
})
