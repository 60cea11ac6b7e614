/**
 * Engine benchmark (`npm run bench:engine [-- --quick] [-- --no-r] [-- --no-polish] [-- --keep]`).
 *
 * Generates a seeded, invented data set (full: 12 labs × 40 mice × 1,000–3,000 neurons ≈ 1M rows;
 * --quick: 12 × 10 × 100–300), writes it as CSV to a temporary folder, and times:
 *  1. `nestwise analyze` as a child process (parse + fit + Satterthwaite + summaries, bootstrap off),
 *     seven runs, with its wall time, CPU time and peak memory (maxRSS and CPU reported by the child
 *     itself, see report-usage.mjs);
 *  2. the same steps in this process, to show where the time goes;
 *  3. lmerTest::lmer on the same file (Rscript, lme4 defaults), when Rscript is installed, and the
 *     largest relative difference between the estimates; the R fit is then polished with a tight
 *     optimiser tolerance (untimed) because lme4's default stopping rule can leave it short of the
 *     optimum on a million rows;
 *  4. `nestwise analyze --bootstrap 1000` and the bootstrap alone.
 * Both fit the maximal nested model: the analyzer states its model in lme4 notation and R fits that
 * formula, lab × treatment term included.
 * Targets: ≥ 30× faster than lmerTest (aim 100×), variances (relative to the total), estimates and
 * SEs within 1e-4, Satterthwaite df within 1e-3, peak memory < 300 MB, bootstrap < 10 s.
 * Wall times depend on what else the machine runs; the CPU-time ratio is printed beside the
 * wall-time ratio because it moves much less when the machine is busy.
 */
import { spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync, statSync } from 'node:fs'
import { availableParallelism, loadavg, tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { AnalysisResult } from '../../shared/schemas/analysis-result'
import { analyzeNested } from '../../shared/analysis/analyze-nested'
import { fitNestedReml } from '../../shared/stats/fit-nested-reml'
import { hierarchicalBootstrap } from '../../shared/stats/hierarchical-bootstrap'
import { prepareNestedDesign } from '../../shared/stats/prepare-nested-design'
import { readColumnsFromFile } from '../cli/read-columns'
import {
  compareEstimates,
  largestDifference,
  type EstimateRow,
  type ReferenceEstimates,
} from './compare-estimates'
import { BENCH_SPEC, QUICK_SPEC, writeNestedCsv } from './generate-nested-csv'
import { runTimed } from './run-timed'

const flags = new Set(process.argv.slice(2))
const quick = flags.has('--quick')
const spec = quick ? QUICK_SPEC : BENCH_SPEC
const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..')
const folder = mkdtempSync(join(tmpdir(), 'nestwise-bench-'))
const csv = join(folder, 'neurite-lengths.csv')
const usageFile = join(folder, 'usage.json')
const columns = {
  response: 'neurite_length_um',
  levels: ['lab', 'animal'],
  condition: 'treatment',
  reference: 'vehicle',
}
const analyzeArgs = [
  'analyze',
  csv,
  '--response',
  columns.response,
  '--levels',
  columns.levels.join(','),
  '--condition',
  columns.condition,
  '--reference',
  columns.reference,
]
const nodeArgs = ['--import', './scripts/bench/report-usage.mjs', 'scripts/run-nestwise.mjs']

const fmt = (x: number, digits = 2) => x.toFixed(digits)
const sci = (x: number | null) => (x === null ? '—' : x.toExponential(1))
const num = (x: number | null) =>
  x === null ? '—' : Math.abs(x) >= 1e5 ? x.toExponential(6) : x.toPrecision(7)
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]
const mb = (kb: number) => `${fmt(kb / 1024, 0)} MB`

function section(title: string) {
  console.log(`\n${title}`)
}

async function analyzerRuns(extra: string[], runs: number) {
  const times: number[] = []
  const cpuTimes: number[] = []
  let last = null
  let peak = 0
  for (let i = 0; i < runs; i++) {
    const run = await runTimed(process.execPath, [...nodeArgs, ...analyzeArgs, ...extra], {
      cwd: root,
      usageFile,
    })
    if (run.code !== 0) throw new Error(`nestwise analyze failed (exit ${run.code}): ${run.stderr.trim()}`)
    times.push(run.seconds)
    cpuTimes.push(run.cpuSeconds ?? NaN)
    peak = Math.max(peak, run.maxRssKb ?? 0)
    last = run
  }
  const result = AnalysisResult.parse(JSON.parse(last!.stdout))
  return { times, median: median(times), cpuTimes, cpuMedian: median(cpuTimes), peakKb: peak, result }
}

function rscriptAvailable(): boolean {
  return spawnSync('Rscript', ['--version'], { stdio: 'ignore' }).status === 0
}

/** One table: our estimates, then each reference's value and relative difference side by side. */
function printComparison(ours: EstimateRow[], references: { title: string; rows: EstimateRow[] }[]) {
  const header = ['quantity'.padEnd(34), 'nestwise'.padStart(14)]
  for (const { title } of references) header.push(title.padStart(14), 'rel.diff'.padStart(9))
  console.log('  ' + header.join(' '))
  ours.forEach((row, i) => {
    const cells = [row.quantity.padEnd(34), num(row.ours).padStart(14)]
    for (const { rows } of references)
      cells.push(num(rows[i].reference).padStart(14), sci(rows[i].relativeDifference).padStart(9))
    console.log('  ' + cells.join(' '))
  })
}

async function main() {
  console.log(
    `Nestwise engine benchmark (${quick ? 'quick' : 'full'}) — node ${process.version}, ${new Date().toISOString()}`,
  )
  // Other work on the machine slows both sides; the load average says how much to trust the times.
  console.log(
    `machine: ${availableParallelism()} cores, load average (1 min) ${fmt(loadavg()[0], 1)} at the start`,
  )

  let started = performance.now()
  const rows = writeNestedCsv(csv, spec)
  const size = statSync(csv).size
  console.log(
    `data: ${rows.toLocaleString('en')} rows = ${spec.labs} labs × ${spec.animalsPerLab} mice × ${spec.minCells}–${spec.maxCells} neurons, ` +
      `treatment between mice; CSV ${fmt(size / 1e6, 1)} MB written in ${fmt((performance.now() - started) / 1000)} s (seed "${spec.seed}")`,
  )

  // The first run after an edit rebuilds the command line's bundle (see run-nestwise.mjs); not timed.
  const warmUp = spawnSync(process.execPath, ['scripts/run-nestwise.mjs', '--help'], { cwd: root })
  if (warmUp.status !== 0) throw new Error(`nestwise --help failed: ${warmUp.stderr}`)

  section(
    'nestwise analyze (child process: start-up + parse + REML fit + Satterthwaite + summaries; bootstrap off)',
  )
  const analyzer = await analyzerRuns([], 7)
  console.log(
    `  wall: ${analyzer.times.map((t) => `${fmt(t)} s`).join(', ')} → median ${fmt(analyzer.median)} s`,
  )
  console.log(
    `  CPU (user + system, all threads): ${analyzer.cpuTimes.map((t) => `${fmt(t)} s`).join(', ')} → median ${fmt(analyzer.cpuMedian)} s`,
  )
  console.log(`  peak memory (maxRSS of the child): ${mb(analyzer.peakKb)}`)

  section('where the time goes (same steps in this process; CPU seconds, wall in brackets)')
  const stage = async <T>(run: () => T | Promise<T>) => {
    const wall = performance.now()
    const cpu = process.cpuUsage()
    const value = await run()
    const used = process.cpuUsage(cpu)
    return { value, cpu: (used.user + used.system) / 1e6, wall: (performance.now() - wall) / 1000 }
  }
  const read = await stage(() => readColumnsFromFile(csv, columns))
  const reference = { [columns.condition]: columns.reference }
  const prepared = await stage(() => prepareNestedDesign(read.value, { reference }))
  const fitted = await stage(() => fitNestedReml(prepared.value))
  const whole = await stage(() => analyzeNested(read.value, { reference }))
  const design = prepared.value
  const show = (t: { cpu: number; wall: number }) => `${fmt(t.cpu)} s (${fmt(t.wall)} s)`
  console.log(
    `  read CSV ${show(read)}; analyzeNested ${show(whole)}, of which path-keyed design ${show(prepared)}, REML fit ${show(fitted)},`,
  )
  console.log(
    `  Satterthwaite, means, tests and warnings the rest; start-up of node + the bundled command line ≈ the child's CPU minus these`,
  )

  let speedup: number | null = null
  let cpuSpeedup: number | null = null
  /** Largest differences per reference fit, for the summary. */
  const agreement: { title: string; rows: EstimateRow[] }[] = []
  if (flags.has('--no-r')) {
    section('lmerTest::lmer: skipped (--no-r)')
  } else if (!rscriptAvailable()) {
    section('lmerTest::lmer: skipped (Rscript not installed)')
  } else {
    const polish = !flags.has('--no-polish')
    section(
      `lmerTest::lmer (Rscript, lme4 default settings${polish ? '; then an untimed polish with a tight tolerance' : ''})`,
    )
    // Our components under R's path names, so R can evaluate its own criterion at our estimates.
    const ours: Record<string, number> = {}
    for (const c of analyzer.result.varianceComponents) {
      const depth = columns.levels.indexOf(c.level)
      ours[depth >= 0 ? columns.levels.slice(0, depth + 1).join(':') : c.level] = c.variance
    }
    const run = await runTimed(
      'Rscript',
      [
        'scripts/bench/lmer-bench.R',
        csv,
        analyzer.result.model!.formula,
        columns.condition,
        columns.reference,
        polish ? 'polish' : 'no-polish',
        JSON.stringify(ours),
      ],
      { cwd: root },
    )
    if (run.code !== 0) throw new Error(`Rscript failed (exit ${run.code}): ${run.stderr.trim()}`)
    const reference = JSON.parse(run.stdout.trim().split('\n').pop()!) as ReferenceEstimates & {
      readSeconds: number
      fitSeconds: number
      readCpuSeconds: number
      fitCpuSeconds: number
      converged: boolean
      remlCriterion: number
      criterionAtOther: number
      versions: { lme4: string; lmerTest: string }
      polished?: ReferenceEstimates & { seconds: number; satterthwaiteSeconds: number; remlCriterion: number }
      atOther: ReferenceEstimates
      steadySteps: ReferenceEstimates
    }
    console.log(
      `  lme4 ${reference.versions.lme4}, lmerTest ${reference.versions.lmerTest}: read.csv ${fmt(reference.readSeconds)} s (not counted); ` +
        `lmer + Satterthwaite + condition means ${fmt(reference.fitSeconds)} s wall, ${fmt(reference.fitCpuSeconds)} s CPU; whole Rscript ${fmt(run.seconds)} s`,
    )
    console.log(
      `  lme4 convergence check: ${reference.converged ? 'passed' : 'warned (stopped short of its gradient tolerance)'}`,
    )
    if (reference.polished) {
      console.log(
        `  polish (not in the ratio): refit ${fmt(reference.polished.seconds)} s, Satterthwaite again ${fmt(reference.polished.satterthwaiteSeconds)} s`,
      )
    }
    speedup = reference.fitSeconds / analyzer.median
    cpuSpeedup = reference.fitCpuSeconds / analyzer.cpuMedian
    console.log(
      `  speed, wall: lmerTest fit ${fmt(reference.fitSeconds)} s vs nestwise whole command ${fmt(analyzer.median)} s → ${fmt(speedup, 1)}× ` +
        `(counting R's CSV read too: ${fmt((reference.readSeconds + reference.fitSeconds) / analyzer.median, 1)}×)`,
    )
    console.log(
      `  speed, CPU:  lmerTest fit ${fmt(reference.fitCpuSeconds)} s vs nestwise whole command ${fmt(analyzer.cpuMedian)} s → ${fmt(cpuSpeedup, 1)}× ` +
        `(counting R's CSV read too: ${fmt((reference.readCpuSeconds + reference.fitCpuSeconds) / analyzer.cpuMedian, 1)}×)`,
    )

    section('estimates (relative difference |nestwise − reference| / |reference|)')
    const rowsDefault = compareEstimates(analyzer.result, reference)
    const rowsPolished = reference.polished ? compareEstimates(analyzer.result, reference.polished) : null
    const rowsAtOurs = compareEstimates(analyzer.result, reference.atOther)
    const rowsSteady = compareEstimates(analyzer.result, reference.steadySteps)
    printComparison(rowsDefault, [
      { title: 'lmerTest', rows: rowsDefault },
      ...(rowsPolished ? [{ title: 'polished', rows: rowsPolished }] : []),
      { title: 'at ours', rows: rowsAtOurs },
      { title: 'steady steps', rows: rowsSteady },
    ])
    console.log(
      "  at ours: lmerTest's SEs and Satterthwaite df evaluated at nestwise's variance components, no optimising;",
    )
    console.log(
      "  steady steps: the same formula from lmerTest's own pieces with numDeriv steps from 10 % of each parameter\n" +
        "  (its default Jacobian step is below the deviance's rounding noise on large data; see lmer-bench.R)",
    )
    agreement.push(
      { title: 'lmerTest (default settings)', rows: rowsDefault },
      ...(rowsPolished ? [{ title: 'polished lme4 + lmerTest', rows: rowsPolished }] : []),
      { title: "lmerTest at nestwise's variance components", rows: rowsAtOurs },
      { title: 'the same with steady derivative steps', rows: rowsSteady },
    )
    const atOurs = reference.criterionAtOther
    const versus = (value: number) =>
      `${value.toFixed(8)} (${value - atOurs >= 0 ? '+' : '−'}${Math.abs(value - atOurs).toExponential(1)} vs nestwise's estimates)`
    console.log("  lme4's own REML criterion (lower is better):")
    console.log(`    at nestwise's estimates    ${atOurs.toFixed(8)}`)
    console.log(`    at its default fit         ${versus(reference.remlCriterion)}`)
    if (reference.polished)
      console.log(`    at its polished fit        ${versus(reference.polished.remlCriterion)}`)
    console.log(`    (nestwise's own value:     ${analyzer.result.remlCriterion!.toFixed(8)})`)
  }

  section('hierarchical bootstrap, 1,000 resamples (seed "bench")')
  const withBootstrap = await analyzerRuns(['--bootstrap', '1000', '--seed', 'bench'], 3)
  started = performance.now()
  const boot = hierarchicalBootstrap(
    { ...design, condition: { labels: design.cells.labels, codes: design.cells.codes } },
    { resamples: 1000, seed: 'bench' },
  )
  const tBoot = (performance.now() - started) / 1000
  console.log(
    `  nestwise analyze --bootstrap 1000: median ${fmt(withBootstrap.median)} s wall, ${fmt(withBootstrap.cpuMedian)} s CPU in all; the bootstrap alone ${fmt(tBoot)} s in this process ` +
      `(${boot.approximatedGroups} of ${boot.innermostGroups} innermost groups drawn from their normal approximation, see hierarchical-bootstrap.ts)`,
  )
  console.log(`  peak memory with bootstrap: ${mb(withBootstrap.peakKb)}`)

  section('summary')
  console.log(`  load average (1 min) at the end: ${fmt(loadavg()[0], 1)} on ${availableParallelism()} cores`)
  const mark = (ok: boolean) => (ok ? 'met' : 'MISSED')
  const peakKb = Math.max(analyzer.peakKb, withBootstrap.peakKb)
  if (speedup !== null)
    console.log(`  speed vs lmerTest, wall: ${fmt(speedup, 1)}× (target ≥ 30×: ${mark(speedup >= 30)})`)
  if (cpuSpeedup !== null)
    console.log(
      `  speed vs lmerTest, CPU time: ${fmt(cpuSpeedup, 1)}× (target ≥ 30×: ${mark(cpuSpeedup >= 30)}; steadier when the machine is busy)`,
    )
  for (const { title, rows } of agreement) {
    const estimates = largestDifference(rows, 'estimates')
    const df = largestDifference(rows, 'df')
    if (estimates)
      console.log(
        `  vs ${title}: variances, estimates, SEs ${sci(estimates.value)} (${estimates.quantity}; target ≤ 1e-4: ${mark(estimates.value <= 1e-4)})`,
      )
    if (df)
      console.log(
        `  vs ${title}: Satterthwaite df ${sci(df.value)} (${df.quantity}; target ≤ 1e-3: ${mark(df.value <= 1e-3)})`,
      )
  }
  console.log(`  peak memory: ${mb(peakKb)} (target < 300 MB: ${mark(peakKb < 300 * 1024)})`)
  console.log(
    `  bootstrap 1,000 resamples, whole command: ${fmt(withBootstrap.median)} s wall, ${fmt(withBootstrap.cpuMedian)} s CPU (target < 10 s: ${mark(withBootstrap.median < 10)})`,
  )
  if (quick) console.log('  (quick mode: small data, the targets are meant for the full run)')
}

try {
  await main()
} finally {
  if (flags.has('--keep')) console.log(`\nkept ${folder}`)
  else rmSync(folder, { recursive: true, force: true })
}
