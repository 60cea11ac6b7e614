/**
 * Number wording for results (common practice, no source): p-values as "p = 0.031" or
 * "p < 0.001", degrees of freedom with one decimal, other numbers with a few significant digits.
 */

/** "p = 0.031", "p = 0.56", "p < 0.001". Two significant digits, at most three decimals. */
export function formatP(p: number): string {
  if (!Number.isFinite(p)) return 'p = —'
  if (p < 0.001) return 'p < 0.001'
  if (p >= 0.995) return 'p = 1.00'
  const digits = p < 0.1 ? 3 : 2
  return `p = ${p.toFixed(digits)}`
}

/**
 * Satterthwaite and other df: one decimal ("8.1"); whole-number df stay whole ("8"). Null (a Wald
 * interval or z test of a binary or count model, which has no df) reads "—".
 */
export function formatDf(df: number | null): string {
  if (df === null || !Number.isFinite(df)) return '—'
  return Number.isInteger(df) ? String(df) : df.toFixed(1)
}

/** Estimates, SEs, means: `digits` significant digits, no exponent for everyday magnitudes. */
export function formatNumber(value: number | null | undefined, digits = 3): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  if (value === 0) return '0'
  const abs = Math.abs(value)
  if (abs < 1e-4 || abs >= 1e7) return value.toExponential(digits - 1)
  const magnitude = Math.floor(Math.log10(abs))
  // Keep integer digits of large numbers rather than rounding 1234 to 1230.
  const decimals = Math.max(0, digits - 1 - magnitude)
  return value.toFixed(Math.min(decimals, 6)).replace(/^-0(\.0*)?$/, '0')
}

/** A share as a percentage: "38%", "0.4%". */
export function formatShare(share: number): string {
  const pct = share * 100
  if (pct > 0 && pct < 1) return `${pct.toFixed(1)}%`
  return `${Math.round(pct)}%`
}

/** "[99.4, 140]" with the same significant digits as the estimate. */
export function formatInterval(low: number, high: number, digits = 3): string {
  return `[${formatNumber(low, digits)}, ${formatNumber(high, digits)}]`
}
