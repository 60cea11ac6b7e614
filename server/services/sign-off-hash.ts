import { createHash } from 'node:crypto'
import { canonicalJson } from '../../shared/canonical/canonical-json'
import type { SignableContent } from '../repositories/reviews.repo'

/**
 * SHA-256 (hex) over what a sign-off vouches for: the dataset version's checksum, the settings,
 * the engine version and the result, each settings/result as canonical JSON so that jsonb's key
 * order never changes the hash. Parts are joined with newlines after a format tag, so a future
 * change of the recipe can be told apart from a tampered record.
 */
export function signOffHash(content: SignableContent): string {
  const text = [
    'nestwise-sign-off-v1',
    content.datasetSha256,
    canonicalJson(content.settings),
    content.engineVersion,
    canonicalJson(content.result),
  ].join('\n')
  return createHash('sha256').update(text, 'utf8').digest('hex')
}
