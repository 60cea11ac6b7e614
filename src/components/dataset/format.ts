/** Number and size wording for dataset screens (English, grouped thousands). */

const count = new Intl.NumberFormat('en-US')

export function formatCount(n: number): string {
  return count.format(n)
}

/** "1 row", "72 rows"; the noun is given in singular and plural so wording stays plain. */
export function plural(n: number, one: string, many: string): string {
  return `${formatCount(n)} ${n === 1 ? one : many}`
}

const units = ['bytes', 'kB', 'MB', 'GB'] as const

/** File sizes in decimal units, as operating systems show them: "1.9 kB", "28.4 MB". */
export function formatBytes(bytes: number): string {
  if (bytes < 1000) return plural(bytes, 'byte', 'bytes')
  let value = bytes
  let unit = 0
  while (value >= 1000 && unit < units.length - 1) {
    value /= 1000
    unit++
  }
  return `${value >= 100 ? Math.round(value) : value.toFixed(1)} ${units[unit]}`
}

/** Dates have one format, in src/formatting/dates.ts; re-exported for the dataset screens. */
export { formatDateTime } from '@/formatting/dates'

/** Column summary numbers: up to four significant digits, no trailing zeros, plain notation. */
export function formatStat(value: number | null): string {
  if (value === null || !Number.isFinite(value)) return '—'
  if (Number.isInteger(value)) return count.format(value)
  const abs = Math.abs(value)
  if (abs !== 0 && (abs < 1e-3 || abs >= 1e9)) return value.toExponential(2)
  return new Intl.NumberFormat('en-US', { maximumSignificantDigits: 4 }).format(value)
}

/** The file name without its extension: the dataset name a new upload starts with. */
export function nameFromFile(fileName: string): string {
  const stem = fileName.replace(/\.[^.]{1,8}$/, '').trim()
  return stem.slice(0, 200)
}
