import { fileStem } from './file-stem'
import type { ChartData, UnitSummary } from '../../shared/schemas/analyses'
import type { FactorSummary, GroupSummary } from '../../shared/schemas/analysis-result'

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

/** The header of a normal response's table with one condition (or none). */
export const UNITS_CSV_HEADER = ['level', 'unit', 'condition', 'n', 'mean', 'sd'] as const

/** The part of a result that says how a design cell ("a:b") splits into one level per factor. */
export interface UnitsCsvDesign {
  factors?: Pick<FactorSummary, 'name'>[]
  groups: Pick<GroupSummary, 'condition' | 'factorLevels'>[]
}

/**
 * For two condition factors (engine ≥ 0.2): the factor names, and each design cell's level of
 * each, from the result's groups. Null for one factor or none, where one condition column says all.
 */
function factorColumns(design: UnitsCsvDesign | null | undefined) {
  const names = (design?.factors ?? []).map((f) => f.name)
  if (names.length < 2) return null
  const cells = new Map<string, Record<string, string>>()
  for (const g of design!.groups) if (g.factorLevels) cells.set(g.condition, g.factorLevels)
  return { names, cells }
}

/**
 * The number columns after the unit's labels, and how one unit fills them: n, mean and SD for a
 * normal response; for a yes/no response n, the yes count (successes), the trials (n, or the
 * summed trials column) and the proportion; for a count response n, the summed count, the rate
 * per observation and the SD.
 */
function numberColumns(family: ChartData['family']): {
  header: string[]
  cells: (unit: UnitSummary) => (number | null)[]
} {
  if (family === 'binomial')
    return {
      header: ['n', 'successes', 'trials', 'proportion'],
      cells: (u) => {
        const trials = u.trials ?? u.n
        // The proportion is successes / trials, so this gives the whole number back.
        return [u.n, Math.round(u.mean * trials), trials, u.mean]
      },
    }
  if (family === 'poisson')
    return {
      header: ['n', 'count', 'rate', 'sd'],
      cells: (u) => [u.n, Math.round(u.mean * u.n), u.mean, u.sd],
    }
  return { header: UNITS_CSV_HEADER.slice(3), cells: (u) => [u.n, u.mean, u.sd] }
}

/**
 * The unit-level summary table of a finished analysis: one line per unit (and condition, when a
 * unit spans several) at every level, outer level first. With two condition factors the units are
 * split by design cell and the condition column gives way to one column per factor, named after
 * it. Binary and count responses give each unit's proportion or rate with the counts behind it
 * (see numberColumns). Text cells are neutralised against formula injection and quoted per RFC
 * 4180; numbers are the server's own and written plainly. CRLF line ends, as RFC 4180 and
 * spreadsheets expect.
 */
export function unitsCsv(
  chart: Pick<ChartData, 'unitLevels'> & Partial<Pick<ChartData, 'family'>>,
  design?: UnitsCsvDesign | null,
): string {
  const numbers = numberColumns(chart.family)
  const factors = factorColumns(design)
  const conditionCells = (condition: string | null): string[] => {
    if (!factors) return [textCell(condition ?? '')]
    const levels = condition === null ? undefined : factors.cells.get(condition)
    return factors.names.map((name) => textCell(levels?.[name] ?? ''))
  }
  const fixed = new Set(['level', 'unit', 'condition', ...numbers.header])
  const header = factors
    ? [
        'level',
        'unit',
        ...factors.names.map((n) => textCell(fixed.has(n) ? `${n} (condition)` : n)),
        ...numbers.header,
      ]
    : ['level', 'unit', 'condition', ...numbers.header]
  const lines = [header.join(',')]
  for (const level of chart.unitLevels) {
    for (const unit of level.units) {
      lines.push(
        [
          textCell(level.level),
          textCell(unit.label),
          ...conditionCells(unit.condition),
          ...numbers.cells(unit).map(numberCell),
        ].join(','),
      )
    }
  }
  return lines.join('\r\n') + '\r\n'
}

/** A download name from the analysis name: letters, digits, - and _ only, never empty. */
export function csvFilename(analysisName: string, versionNo: number): string {
  return `${fileStem(analysisName)}-v${versionNo}-units.csv`
}
