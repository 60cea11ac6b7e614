/**
 * Colour for a count of independent units in one arm (common practice, no source): fewer than 3 is
 * too few to compare, 3–5 is thin, 6 or more is adequate. The number is always shown beside it.
 */
export type UnitAdequacy = 'too-few' | 'thin' | 'adequate'

export function unitAdequacy(units: number): UnitAdequacy {
  if (units < 3) return 'too-few'
  if (units < 6) return 'thin'
  return 'adequate'
}

export const adequacyLook: Record<UnitAdequacy, { color: string; icon: string; words: string }> = {
  'too-few': { color: 'error', icon: 'mdi-alert-octagon-outline', words: 'too few to compare' },
  thin: { color: 'warning', icon: 'mdi-alert-outline', words: 'few' },
  adequate: { color: 'success', icon: 'mdi-check-circle-outline', words: 'enough' },
}
