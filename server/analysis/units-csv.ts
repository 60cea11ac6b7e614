import type { ChartData } from '../../shared/schemas/analyses'

/** Characters that make a spreadsheet treat a cell as a formula (OWASP "CSV injection"). */
const FORMULA_START = /^[=+\-@\t\r]/

/** Prefixes a single quote to text a spreadsheet would run as a formula. */
export function neutraliseCell(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text
}

/** RFC 4180: quote a field holding a comma, a quote or a line break; double inner quotes. */
export function quoteCsvField(text: string): string {
  return /[",\r\n]/.test(text) ? `"${text.replaceAll('"', '""')}"` : text
}

const textCell = (text: string) => quoteCsvField(neutraliseCell(text))

/** Numbers as JavaScript writes them (shortest round-trip form); empty for null. */
const numberCell = (value: number | null) => (value === null ? '' : String(value))

export const UNITS_CSV_HEADER = ['level', 'unit', 'condition', 'n', 'mean', 'sd'] as const

/**
 * The unit-level summary table of a finished analysis: one line per unit (and condition, when a
 * unit spans several) at every level, outer level first. Text cells are neutralised against
 * formula injection and quoted per RFC 4180; numbers are the server's own and written plainly.
 * CRLF line ends, as RFC 4180 and spreadsheets expect.
 */
export function unitsCsv(chart: Pick<ChartData, 'unitLevels'>): string {
  const lines = [UNITS_CSV_HEADER.join(',')]
  for (const level of chart.unitLevels) {
    for (const unit of level.units) {
      lines.push(
        [
          textCell(level.level),
          textCell(unit.label),
          textCell(unit.condition ?? ''),
          numberCell(unit.n),
          numberCell(unit.mean),
          numberCell(unit.sd),
        ].join(','),
      )
    }
  }
  return lines.join('\r\n') + '\r\n'
}

/** A download name from the analysis name: letters, digits, - and _ only, never empty. */
export function csvFilename(analysisName: string, versionNo: number): string {
  const base = analysisName
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .replace(/[^A-Za-z0-9_-]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 80)
  return `${base || 'analysis'}-v${versionNo}-units.csv`
}
