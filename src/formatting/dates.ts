/**
 * The one way dates are written on screen: the reader's own locale and time zone through Intl
 * (the browser's language setting decides "3 Dec 2026" or "Dec 3, 2026"), medium date style, and
 * hours and minutes where a time matters. The native date pickers (`<input type="date">`) follow
 * the same browser locale, so what is typed and what is shown agree.
 *
 * `locale` is for tests; screens leave it out.
 */
const cache = new Map<string, Intl.DateTimeFormat>()

function formatter(kind: 'date' | 'dateTime', locale?: string): Intl.DateTimeFormat {
  const key = `${kind}/${locale ?? ''}`
  let f = cache.get(key)
  if (!f) {
    f = new Intl.DateTimeFormat(
      locale,
      kind === 'date' ? { dateStyle: 'medium' } : { dateStyle: 'medium', timeStyle: 'short' },
    )
    cache.set(key, f)
  }
  return f
}

function parse(value: string | Date): Date | null {
  const date = value instanceof Date ? value : new Date(value)
  return Number.isNaN(date.getTime()) ? null : date
}

/** A moment: "3 Dec 2026, 09:14" (en-GB), "Dec 3, 2026, 9:14 AM" (en-US). Unreadable input is shown as given. */
export function formatDateTime(value: string | Date, locale?: string): string {
  const date = parse(value)
  return date ? formatter('dateTime', locale).format(date) : String(value)
}

/** A day: "3 Dec 2026" (en-GB), "Dec 3, 2026" (en-US). */
export function formatDate(value: string | Date, locale?: string): string {
  const date = parse(value)
  return date ? formatter('date', locale).format(date) : String(value)
}
