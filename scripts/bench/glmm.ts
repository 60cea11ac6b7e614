/**
 * Binary-response benchmark (`npm run bench:glmm [-- --quick] [-- --no-r] [-- --keep]`).
 *
 * Writes a seeded, invented yes/no table (full: 12 labs × 40 mice × 1,000–3,000 neurons ≈ 1M rows,
 * treatment between mice within labs, labs differing in their response; --quick: 12 × 10 × 100–300),
 * then times `nestwise analyze --family binomial` as a child process (start-up, parse, the nested
 * GLMM by the Laplace approximation, Wald tests, summaries) and lme4's glmer fitting the analyzer's
 * own formula on the same file (lme4 defaults). Prints both, the ratio, peak memory, and the
 * largest differences between the estimates.
 * Targets: ≥ 30× faster than glmer's fit alone (aim 100×), peak memory < 300 MB.
 */
import { spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync, statSync } from 'node:fs'
import { availableParallelism, loadavg, tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { AnalysisResult, isWald } from '../../shared/schemas/analysis-result'
import { BINARY_QUICK_SPEC, BINARY_SPEC, writeBinaryCsv } from './generate-nested-csv'
import { runTimed } from './run-timed'

const flags = new Set(process.argv.slice(2))
const spec = flags.has('--quick') ? BINARY_QUICK_SPEC : BINARY_SPEC
const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..')
const folder = mkdtempSync(join(tmpdir(), 'nestwise-glmm-bench-'))
const csv = join(folder, 'marker-positive.csv')
const usageFile = join(folder, 'usage.json')
const args = [
  'analyze',
  csv,
  '--response',
  'marker_positive',
  '--levels',
  'lab,animal',
  '--condition',
  'treatment',
  '--reference',
  'vehicle',
  '--family',
  'binomial',
]
const nodeArgs = ['--import', './scripts/bench/report-usage.mjs', 'scripts/run-nestwise.mjs']
const fmt = (x: number, digits = 2) => x.toFixed(digits)
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]

async function main() {
  console.log(`Nestwise binary-response benchmark — node ${process.version}, ${new Date().toISOString()}`)
  console.log(
    `machine: ${availableParallelism()} cores, load average (1 min) ${fmt(loadavg()[0], 1)} at the start`,
  )
  const rows = writeBinaryCsv(csv, spec)
  console.log(
    `data: ${rows.toLocaleString('en')} rows = ${spec.labs} labs × ${spec.animalsPerLab} mice × ${spec.minCells}–${spec.maxCells} neurons, ` +
      `CSV ${fmt(statSync(csv).size / 1e6, 1)} MB (seed "${spec.seed}")`,
  )
  const warmUp = spawnSync(process.execPath, ['scripts/run-nestwise.mjs', '--help'], { cwd: root })
  if (warmUp.status !== 0) throw new Error(`nestwise --help failed: ${warmUp.stderr}`)

  const times: number[] = []
  const cpu: number[] = []
  let peakKb = 0
  let result: AnalysisResult | null = null
  for (let i = 0; i < 5; i++) {
    const run = await runTimed(process.execPath, [...nodeArgs, ...args], { cwd: root, usageFile })
    if (run.code !== 0) throw new Error(`nestwise analyze failed (exit ${run.code}): ${run.stderr.trim()}`)
    times.push(run.seconds)
    cpu.push(run.cpuSeconds ?? NaN)
    peakKb = Math.max(peakKb, run.maxRssKb ?? 0)
    result = AnalysisResult.parse(JSON.parse(run.stdout))
  }
  console.log(`\nnestwise analyze --family binomial (whole command)`)
  console.log(
    `  wall ${times.map((t) => fmt(t)).join(', ')} s → median ${fmt(median(times))} s; CPU median ${fmt(median(cpu))} s`,
  )
  console.log(`  peak memory ${fmt(peakKb / 1024, 0)} MB; model ${result!.model!.formula}`)

  let ratio: number | null = null
  if (flags.has('--no-r') || spawnSync('Rscript', ['--version']).status !== 0) {
    console.log('\nglmer: skipped')
  } else {
    const run = await runTimed(
      'Rscript',
      ['scripts/bench/glmer-bench.R', csv, result!.model!.formula, 'treatment', 'vehicle'],
      { cwd: root },
    )
    if (run.code !== 0) throw new Error(`Rscript failed: ${run.stderr.trim()}`)
    const ref = JSON.parse(run.stdout.trim().split('\n').pop()!)
    ratio = ref.fitSeconds / median(times)
    console.log(
      `\nglmer (lme4 ${ref.versions.lme4}, defaults): fit ${fmt(ref.fitSeconds)} s wall, ${fmt(ref.fitCpuSeconds)} s CPU; convergence check ${ref.converged ? 'passed' : 'warned'}`,
    )
    console.log(`  speed, wall: ${fmt(ratio, 1)}×; CPU: ${fmt(ref.fitCpuSeconds / median(cpu), 1)}×`)
    const coefficients = result!.comparisons.mixedModel!.coefficients!.filter(isWald)
    const worst = (pairs: [number, number][]) =>
      Math.max(...pairs.map(([a, b]) => Math.abs(a - b) / Math.abs(b)))
    console.log(
      `  largest relative difference: estimates ${worst(coefficients.map((c, i) => [c.estimate, ref.beta[i]])).toExponential(1)}; ` +
        `SEs ${worst(coefficients.map((c, i) => [c.se, ref.seRx[i]])).toExponential(1)} against glmer's SEs given θ (vcov from RX), ` +
        `${worst(coefficients.map((c, i) => [c.se, ref.se[i]])).toExponential(1)} against its default Hessian-based SEs`,
    )
    console.log(
      `  SEs: nestwise ${coefficients.map((c) => c.se.toPrecision(5)).join(', ')}; glmer from RX ${ref.seRx.map((v: number) => v.toPrecision(5)).join(', ')}; ` +
        `glmer default ${ref.se.map((v: number) => v.toPrecision(5)).join(', ')} (its finite-difference Hessian is noisy on a million rows at lme4's default PIRLS tolerance)`,
    )
    const total = result!.varianceComponents.slice(0, -1).reduce((s, c) => s + c.variance, 0)
    for (const c of result!.varianceComponents.slice(0, -1)) {
      const key = c.level === 'animal' ? 'lab:animal' : c.level
      console.log(
        `  variance ${c.level}: ${c.variance.toPrecision(6)} vs ${Number(ref.components[key]).toPrecision(6)} (diff / total ${(Math.abs(c.variance - ref.components[key]) / total).toExponential(1)})`,
      )
    }
  }
  console.log('\nsummary')
  console.log(`  load average (1 min) at the end: ${fmt(loadavg()[0], 1)} on ${availableParallelism()} cores`)
  if (ratio !== null)
    console.log(`  speed vs glmer, wall: ${fmt(ratio, 1)}× (target ≥ 30×: ${ratio >= 30 ? 'met' : 'MISSED'})`)
  console.log(
    `  peak memory: ${fmt(peakKb / 1024, 0)} MB (target < 300 MB: ${peakKb < 300 * 1024 ? 'met' : 'MISSED'})`,
  )
}

try {
  await main()
} finally {
  if (flags.has('--keep')) console.log(`\nkept ${folder}`)
  else rmSync(folder, { recursive: true, force: true })
}
