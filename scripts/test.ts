// `npm test`: the same set-up as `npm start`, then type-check, unit, integration and browser tests.
// The cluster runs on a free port when another checkout's holds the configured one, and is stopped
// again at the end when this run started it.
import { spawnSync } from 'node:child_process'
import { mkdirSync, readFileSync, existsSync, rmSync } from 'node:fs'
import { ensurePostgres, stopPostgres } from './lib/postgres'
import { ensureChromium, ensureRReference } from './lib/prerequisites'

interface Counts {
  passed: number
  failed: number
  skipped: number
}
interface Stage {
  name: string
  ok: boolean
  seconds: number
  counts?: Counts
}

const reportDir = 'test-results/reports'
rmSync(reportDir, { recursive: true, force: true })
mkdirSync(reportDir, { recursive: true })

function stage(
  name: string,
  command: string,
  args: string[],
  env: NodeJS.ProcessEnv = {},
  counts?: () => Counts,
): Stage {
  console.log(`\n=== ${name}: ${command} ${args.join(' ')}`)
  const started = Date.now()
  const result = spawnSync(command, args, { stdio: 'inherit', env: { ...process.env, ...env } })
  // Ctrl-C reached the stage too: stop here, and stop the cluster this run started.
  if (result.signal === 'SIGINT') {
    stopOwnCluster()
    process.exit(130)
  }
  const done: Stage = { name, ok: result.status === 0, seconds: (Date.now() - started) / 1000 }
  try {
    done.counts = counts?.()
  } catch {
    done.counts = undefined
  }
  return done
}

function vitestCounts(file: string): () => Counts {
  return () => {
    const report = JSON.parse(readFileSync(file, 'utf8'))
    return {
      passed: report.numPassedTests,
      failed: report.numFailedTests,
      skipped: report.numPendingTests + report.numTodoTests,
    }
  }
}

function playwrightCounts(file: string): () => Counts {
  return () => {
    const { stats } = JSON.parse(readFileSync(file, 'utf8'))
    return { passed: stats.expected + stats.flaky, failed: stats.unexpected, skipped: stats.skipped }
  }
}

ensureChromium()
ensureRReference()
const cluster = ensurePostgres({ moveIfTaken: true })
// Every stage (and the servers they start) talks to the cluster where it actually runs.
process.env.PGPORT = String(cluster.port)
const stopOwnCluster = () => {
  if (cluster.started) stopPostgres()
}

const vitest = (project: string) => [
  'vitest',
  'run',
  '--project',
  project,
  '--reporter=default',
  '--reporter=json',
  `--outputFile.json=${reportDir}/${project}.json`,
]
const stages: Stage[] = [
  stage('type-check', 'npx', ['vue-tsc', '-b']),
  stage('lint', 'npx', ['eslint', '.']),
  stage('unit', 'npx', vitest('unit'), {}, vitestCounts(`${reportDir}/unit.json`)),
  stage('integration', 'npx', vitest('integration'), {}, vitestCounts(`${reportDir}/integration.json`)),
  stage('build', 'npx', ['vite', 'build', '--logLevel', 'warn']),
]
const built = stages.at(-1)!.ok && existsSync('dist/client/index.html')
if (built) {
  stages.push(
    stage(
      'browser',
      'npx',
      ['playwright', 'test'],
      { PLAYWRIGHT_JSON_OUTPUT_NAME: `${reportDir}/e2e.json` },
      playwrightCounts(`${reportDir}/e2e.json`),
    ),
  )
}

console.log('\n=== Summary')
const total: Counts = { passed: 0, failed: 0, skipped: 0 }
for (const s of stages) {
  const c = s.counts
  if (c) {
    total.passed += c.passed
    total.failed += c.failed
    total.skipped += c.skipped
  }
  const detail = c ? ` — ${c.passed} passed, ${c.failed} failed, ${c.skipped} skipped` : ''
  console.log(`${s.ok ? 'ok  ' : 'FAIL'} ${s.name.padEnd(12)} ${s.seconds.toFixed(1).padStart(6)} s${detail}`)
}
const failedStages = stages.filter((s) => !s.ok).length + (built ? 0 : 1)
if (failedStages && total.failed === 0) total.failed = failedStages
console.log(`tests: ${total.passed} passed, ${total.failed} failed, ${total.skipped} skipped`)
stopOwnCluster()
process.exit(failedStages ? 1 : 0)
