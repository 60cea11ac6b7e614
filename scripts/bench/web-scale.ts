/**
 * Signed-in readers against one web process and against two (`npm run bench:web [-- --seconds 60]
 * [-- --connections 200]`): prints figures, it is not a timed test.
 *
 * Its own database (nestwise_bench_web, the demo scenario) and web processes with
 * ANALYSIS_WORKERS=0 (server/index.ts, as deployed behind a load balancer). The demo scientist signs
 * in, and autocannon keeps `--connections` connections busy reading the analyses list
 * (GET /api/v1/analyses with the session cookie) for `--seconds` after 5 s of warm-up, in three
 * set-ups:
 * 1. one web process, addressed directly;
 * 2. the same process behind the small Node proxy (round-robin-proxy.ts), the proxy's own cost;
 * 3. two web processes behind that proxy.
 * Prints requests/s, p50, p99 and errors of each, the ratio of 3 to 1 and 2, and the load average
 * around each run. Client, proxy, web processes and PostgreSQL share this machine's cores.
 */
import { spawn, type ChildProcess } from 'node:child_process'
import { loadavg } from 'node:os'
import autocannon from 'autocannon'
import { signInAsDemoScientist } from './bench-server'
import { numberOption } from './number-option'

const CONNECTIONS = numberOption('connections', 200)
const SECONDS = numberOption('seconds', 60)
const DATABASE = 'nestwise_bench_web'

process.env.PGDATABASE = DATABASE
process.env.NODE_ENV = 'test'
const { ensurePostgres } = await import('../lib/postgres')
const { prepareDatabase, dropDatabase } = await import('../lib/database')
const { startWeb, stopProcess, waitReady } = await import('../lib/app-processes')
const { freePortSync } = await import('../lib/ports')

const load = () =>
  loadavg()
    .map((l) => l.toFixed(2))
    .join(' ')

interface Row {
  setup: string
  requestsPerSecond: number
  p50: number
  p99: number
  errors: number
  /** non-2xx answers / timeouts / connection errors */
  errorKinds: string
  loadBefore: string
  loadAfter: string
}

function startProxy(port: number, targets: string[]): ChildProcess {
  return spawn(
    process.execPath,
    ['--import', 'tsx', 'scripts/bench/round-robin-proxy.ts', String(port), ...targets],
    {
      stdio: ['ignore', 'ignore', 'inherit'],
    },
  )
}

async function waitFor(url: string): Promise<void> {
  for (let k = 0; k < 300; k++) {
    try {
      if ((await fetch(url)).ok) return
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 100))
  }
  throw new Error(`${url} did not come up`)
}

async function drive(setup: string, base: string, headers: Record<string, string>): Promise<Row> {
  const url = `${base}/api/v1/analyses`
  await autocannon({ url, connections: CONNECTIONS, duration: 5, headers })
  const loadBefore = load()
  const result = await autocannon({ url, connections: CONNECTIONS, duration: SECONDS, headers })
  const row = {
    setup,
    requestsPerSecond: result.requests.average,
    p50: result.latency.p50,
    p99: result.latency.p99,
    errors: result.errors + result.non2xx + result.timeouts,
    errorKinds: `${result.non2xx}/${result.timeouts}/${result.errors - result.timeouts}`,
    loadBefore,
    loadAfter: load(),
  }
  console.log(
    `[bench] ${setup}: ${Math.round(row.requestsPerSecond)} requests/s, p99 ${row.p99} ms, errors ${row.errors} (non-2xx/timeouts/other ${row.errorKinds}) (load ${row.loadBefore} → ${row.loadAfter})`,
  )
  return row
}

ensurePostgres()
await prepareDatabase(DATABASE, { fresh: true, seed: true })
const env = { PGDATABASE: DATABASE, NODE_ENV: 'test', ANALYSIS_WORKERS: '0' }
const webA = startWeb('web A', env)
const webB = startWeb('web B', env)
const proxies: ChildProcess[] = []
try {
  await Promise.all([waitReady(webA), waitReady(webB)])
  // One session, signed in through web A; sessions live in PostgreSQL, so web B knows it too.
  const { headers } = await signInAsDemoScientist(webA.base)
  const listed = (
    (await (await fetch(`${webA.base}/api/v1/analyses`, { headers })).json()) as { data: unknown[] }
  ).data
  console.log(
    `[bench] ${CONNECTIONS} connections, ${SECONDS} s per set-up after 5 s of warm-up; the demo scientist sees ${listed.length} analyses`,
  )
  const rows: Row[] = []
  rows.push(await drive('one web process, direct', webA.base, headers))

  const onePort = freePortSync()
  proxies.push(startProxy(onePort, [webA.base]))
  await waitFor(`http://127.0.0.1:${onePort}/api/health/live`)
  rows.push(await drive('one web process behind the proxy', `http://127.0.0.1:${onePort}`, headers))

  const twoPort = freePortSync()
  proxies.push(startProxy(twoPort, [webA.base, webB.base]))
  await waitFor(`http://127.0.0.1:${twoPort}/api/health/live`)
  rows.push(await drive('two web processes behind the proxy', `http://127.0.0.1:${twoPort}`, headers))

  console.log(
    '\n| set-up | requests/s | p50 | p99 | errors (non-2xx/timeouts/other) | load average before → after |',
  )
  console.log('|---|---|---|---|---|---|')
  for (const row of rows)
    console.log(
      `| ${row.setup} | ${Math.round(row.requestsPerSecond).toLocaleString('en-US')} | ${row.p50} ms | ${row.p99} ms | ${row.errors} (${row.errorKinds}) | ${row.loadBefore} → ${row.loadAfter} |`,
    )
  const [direct, proxied, two] = rows
  console.log(
    `\n[bench] two processes ÷ one direct: ${(two.requestsPerSecond / direct.requestsPerSecond).toFixed(2)}; ÷ one behind the proxy: ${(two.requestsPerSecond / proxied.requestsPerSecond).toFixed(2)}`,
  )
} finally {
  for (const proxy of proxies) proxy.kill('SIGTERM')
  await Promise.all([stopProcess(webA), stopProcess(webB)])
  await dropDatabase(DATABASE)
}
process.exit(0)
