import { createHash, randomBytes } from 'node:crypto'

/** 32 random bytes: 256 bits, far beyond guessing. Only the holder of the e-mail has the token. */
export function newInvitationToken(): string {
  return randomBytes(32).toString('base64url')
}

/** What the database keeps: a lookup key that cannot be turned back into a working link. */
export function hashInvitationToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex')
}
