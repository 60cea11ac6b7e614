import { readdirSync, readFileSync, statSync } from 'node:fs'
import { join, relative } from 'node:path'
import { describe, expect, it } from 'vitest'
import { formatDate, formatDateTime } from './dates'

const SRC = join(__dirname, '..')

function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name)
    if (statSync(path).isDirectory()) return sourceFiles(path)
    return /\.(ts|vue)$/.test(name) && !name.endsWith('.test.ts') ? [path] : []
  })
}

describe('dates', () => {
  const moment = '2026-12-03T09:14:00Z'
  it('writes a moment in the given locale’s medium style with hours and minutes', () => {
    expect(formatDateTime(moment, 'en-GB')).toMatch(/^3 Dec 2026, \d{2}:\d{2}$/)
    expect(formatDateTime(moment, 'en-US')).toMatch(/^Dec 3, 2026, \d{1,2}:\d{2}\s?[AP]M$/)
  })
  it('writes a day in the given locale’s medium style', () => {
    expect(formatDate('2026-12-03T12:00:00Z', 'en-GB')).toBe('3 Dec 2026')
    expect(formatDate('2026-12-03T12:00:00Z', 'de-DE')).toBe('03.12.2026')
  })
  it('shows unreadable input as it came', () => {
    expect(formatDateTime('not a date')).toBe('not a date')
  })
  it('is the only place in the app that formats dates', () => {
    const offenders = sourceFiles(SRC)
      .filter((path) => !path.endsWith(join('formatting', 'dates.ts')))
      .filter((path) =>
        /toLocale(Date|Time)?String\(|Intl\.DateTimeFormat|toUTCString\(/.test(readFileSync(path, 'utf8')),
      )
      .map((path) => relative(SRC, path))
    expect(offenders).toEqual([])
  })
})
