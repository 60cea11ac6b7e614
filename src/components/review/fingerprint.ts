/**
 * A 64-character SHA-256 in groups of eight, so a person can compare it by eye:
 * "3f2a9c01 7be4…". The short form (first 12 characters) names it in running text.
 */
export function fingerprintGroups(hash: string): string {
  return hash.match(/.{1,8}/g)?.join(' ') ?? hash
}

export function shortFingerprint(hash: string): string {
  return hash.slice(0, 12)
}
