/**
 * Colour for a count of independent units in one arm (common practice, no source): fewer than 3 is
 * too few to compare, 3–5 is thin, 6 or more is the minimum for a usable estimate of the variance
 * between units. The number is always shown beside it. The rule counts units; it says nothing about
 * power, which depends on the difference that matters and on the spread (the planner computes it).
 */
export type UnitAdequacy = 'too-few' | 'thin' | 'adequate'

export function unitAdequacy(units: number): UnitAdequacy {
  if (units < 3) return 'too-few'
  if (units < 6) return 'thin'
  return 'adequate'
}

/**
 * `words`: what the colour means, in full ("6+ units per arm: the minimum for a usable variance
 * estimate"); `short`: the same in a chip's room ("6+ per arm"), always beside the full words on hover.
 */
export const adequacyLook: Record<
  UnitAdequacy,
  { color: string; icon: string; words: string; short: string }
> = {
  'too-few': {
    color: 'error',
    icon: 'mdi-alert-octagon-outline',
    words: 'fewer than 3 units per arm: too few to compare',
    short: 'too few to compare',
  },
  thin: {
    color: 'warning',
    icon: 'mdi-alert-outline',
    words: '3–5 units per arm: a rough variance estimate',
    short: '3–5 per arm',
  },
  adequate: {
    color: 'success',
    icon: 'mdi-check-circle-outline',
    words: '6+ units per arm: the minimum for a usable variance estimate',
    short: '6+ per arm',
  },
}

/** Where the rule comes from and what it does not say; shown wherever the colour is. */
export const ADEQUACY_RULE =
  'A rule of thumb (common practice, no source) that counts independent units; it does not say whether the comparison has enough power.'
