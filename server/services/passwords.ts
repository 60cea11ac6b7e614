import { randomBytes, scrypt, timingSafeEqual, type ScryptOptions } from 'node:crypto'

/**
 * Password hashing with scrypt from node:crypto (no native add-on to build).
 * Stored form: `scrypt$N$r$p$salt$hash` (salt and hash base64), so the cost can be raised later
 * without breaking existing hashes: verification always uses the parameters stored with the hash.
 */

// N = 2^15, r = 8, p = 3 is one of the equivalent minimum settings listed in OWASP's Password Storage
// Cheat Sheet (from memory); it needs 32 MiB per hash instead of 128 MiB for N = 2^17, p = 1.
// Measured here: roughly 0.3-0.4 s per hash on a busy 2-core machine.
export const DEFAULT_PARAMS = { N: 2 ** 15, r: 8, p: 3 }
const KEY_LENGTH = 64
const SALT_BYTES = 16
// Refuse absurd parameters read from the database instead of letting them exhaust memory.
const MAX_N = 2 ** 20

function scryptAsync(
  password: string,
  salt: Buffer,
  keyLength: number,
  options: ScryptOptions,
): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    scrypt(password, salt, keyLength, options, (err, key) => (err ? reject(err) : resolve(key)))
  })
}

// scrypt needs about 128 * N * r bytes; Node's default maxmem (32 MiB) is exactly at our default, so give headroom.
function memoryFor(N: number, r: number): number {
  return 128 * N * r * 2
}

export interface ScryptParams {
  N: number
  r: number
  p: number
}

export async function hashPassword(password: string, params: ScryptParams = DEFAULT_PARAMS): Promise<string> {
  const salt = randomBytes(SALT_BYTES)
  const { N, r, p } = params
  const key = await scryptAsync(password, salt, KEY_LENGTH, { N, r, p, maxmem: memoryFor(N, r) })
  return ['scrypt', N, r, p, salt.toString('base64'), key.toString('base64')].join('$')
}

interface ParsedHash {
  N: number
  r: number
  p: number
  salt: Buffer
  key: Buffer
}

function parseHash(stored: string): ParsedHash | null {
  const parts = stored.split('$')
  if (parts.length !== 6 || parts[0] !== 'scrypt') return null
  const [N, r, p] = parts.slice(1, 4).map(Number)
  const isPowerOfTwo = Number.isInteger(N) && N > 1 && (N & (N - 1)) === 0
  if (
    !isPowerOfTwo ||
    N > MAX_N ||
    !Number.isInteger(r) ||
    r < 1 ||
    r > 32 ||
    !Number.isInteger(p) ||
    p < 1 ||
    p > 16
  ) {
    return null
  }
  const salt = Buffer.from(parts[4], 'base64')
  const key = Buffer.from(parts[5], 'base64')
  if (salt.length === 0 || key.length === 0) return null
  return { N, r, p, salt, key }
}

/** True when `password` matches `stored`. Malformed stored values never match. Comparison is constant-time. */
export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const parsed = parseHash(stored)
  if (!parsed) return false
  const { N, r, p, salt, key } = parsed
  const candidate = await scryptAsync(password, salt, key.length, { N, r, p, maxmem: memoryFor(N, r) })
  return timingSafeEqual(candidate, key)
}
