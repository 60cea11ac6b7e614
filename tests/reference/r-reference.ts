/**
 * The harness the live-R reference tests share: whether Rscript runs here, running one of this
 * folder's R scripts, the CSV a case is refitted from, the coefficient and cell contrast rows, and
 * the report of the largest difference seen per quantity.
 */
import { execFileSync, spawnSync } from 'node:child_process'
import { writeFileSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { cellMeanRow } from '../../shared/stats/cell-mean-row'
import type { NestedDesign } from '../../shared/stats/types'

const here = dirname(fileURLToPath(import.meta.url))

/** Whether Rscript runs here; when it does not, warns that `comparison` is skipped. */
export function rscriptAvailable(label: string, comparison: string): boolean {
  const r = spawnSync('Rscript', ['--version'], { encoding: 'utf8' })
  const available = !r.error && r.status === 0
  if (!available) console.warn(`${label}: Rscript not found, ${comparison} is SKIPPED.`)
  return available
}

/** Runs `script` (a file in this folder) with `args` and returns what it prints. */
export function runRScript(script: string, args: string[], timeout: number): string {
  return execFileSync('Rscript', [join(here, script), ...args], {
    encoding: 'utf8',
    timeout,
    maxBuffer: 1 << 26,
  })
}

/** Writes `specs` to `dir`/spec.json, runs `script` on it and parses the JSON it prints. */
export function referenceFromSpecs<T>(script: string, dir: string, specs: unknown, timeout: number): T {
  const specPath = join(dir, 'spec.json')
  writeFileSync(specPath, JSON.stringify(specs))
  return JSON.parse(runRScript(script, [specPath], timeout)) as T
}

/** `columns` of `table` as CSV: names and text quoted, NaN as R's NA. */
export function referenceCsv(table: Record<string, readonly (string | number)[]>, columns: string[]): string {
  const n = table[columns[0]].length
  const rows = [columns.map(quote).join(',')]
  for (let r = 0; r < n; r++)
    rows.push(
      columns
        .map((name) => {
          const v = table[name][r]
          return typeof v === 'number' ? (Number.isNaN(v) ? 'NA' : String(v)) : quote(v)
        })
        .join(','),
    )
  return rows.join('\n') + '\n'
}

function quote(s: string): string {
  return `"${s.replace(/"/g, '""')}"`
}

/** Unit rows for every coefficient, each cell's mean row, and every pair of cells (later minus earlier). */
export function cellContrastRows(design: NestedDesign): {
  unit: number[][]
  means: number[][]
  pairs: number[][]
} {
  const p = design.fixed.columns.length
  const unit = design.fixed.columns.map((_, j) => Array.from({ length: p }, (__, k) => (k === j ? 1 : 0)))
  const means = design.cells.labels.map((_, c) => cellMeanRow(design, c))
  const pairs: number[][] = []
  for (let i = 0; i < means.length; i++)
    for (let j = i + 1; j < means.length; j++) pairs.push(means[j].map((v, k) => v - means[i][k]))
  return { unit, means, pairs }
}

/**
 * The largest difference seen per quantity, reported after the run. A difference within
 * `absTolerance` is shown as the smaller of its relative and absolute size.
 */
export class WorstDifferences {
  private readonly worst = new Map<string, { rel: number; where: string }>()

  constructor(private readonly absTolerance = 0) {}

  note(quantity: string, where: string, rel: number, diff = Infinity): void {
    const shown = diff <= this.absTolerance ? Math.min(rel, diff) : rel
    const prev = this.worst.get(quantity)
    if (!prev || shown > prev.rel) this.worst.set(quantity, { rel: shown, where })
  }

  report(heading: string, width: number): void {
    const lines = [...this.worst.entries()].map(
      ([q, w]) => `  ${q.padEnd(width)} ${w.rel.toExponential(2)}  (${w.where})`,
    )
    if (lines.length) console.log(`${heading}\n${lines.join('\n')}`)
  }
}
