/**
 * Throughput of signed-in reads (`npm run bench:http [-- --connections 200] [-- --seconds 10] [-- --port 3191]`).
 *
 * Starts a server of its own (database nestwise_bench_http, the demo scenario; its request log is
 * written but not shown), signs in as the demo scientist and drives it with autocannon at `--connections`
 * concurrent connections, one endpoint after another, each for `--seconds` after a short warm-up:
 * - GET /api/health (one trivial database query, no session): the ceiling of this machine;
 * - GET /api/v1/auth/me (the session and the user, nothing else);
 * - GET /api/v1/analyses (the analyses list, the page most visited).
 * Prints requests/s, p50, p99 and errors per endpoint, each one's ratio to the health endpoint,
 * and the load average before and after (the machine may be shared).
 * Target: the analyses list ≥ 1,000 requests/s with p99 < 300 ms at 200 connections on 2 cores.
 */
import { loadavg } from 'node:os'
import autocannon from 'autocannon'
import { signInAsDemoScientist, startBenchServer, waitForHealth } from './bench-server'
import { numberOption } from './number-option'

const CONNECTIONS = numberOption('connections', 200)
const SECONDS = numberOption('seconds', 10)
const PORT = numberOption('port', 3191)
const DATABASE = 'nestwise_bench_http'

process.env.PGDATABASE = DATABASE
process.env.NODE_ENV = 'test'
const { ensurePostgres } = await import('../lib/postgres')
const { prepareDatabase, dropDatabase } = await import('../lib/database')

const load = () =>
  loadavg()
    .map((l) => l.toFixed(2))
    .join(' ')

interface Row {
  endpoint: string
  requestsPerSecond: number
  p50: number
  p99: number
  errors: number
}

async function drive(base: string, path: string, headers: Record<string, string>, seconds: number) {
  return autocannon({
    url: `${base}${path}`,
    connections: CONNECTIONS,
    duration: seconds,
    headers,
  })
}

ensurePostgres()
await prepareDatabase(DATABASE, { fresh: true, seed: true })
// The server still writes its request log (a line per request, as in production); it is not shown.
const server = startBenchServer({ database: DATABASE, port: PORT, quiet: true })
try {
  await waitForHealth(server.base, 300)
  const { headers } = await signInAsDemoScientist(server.base)
  const analyses = await fetch(`${server.base}/api/v1/analyses`, { headers })
  const listed = ((await analyses.json()) as { data: unknown[] }).data.length
  console.log(
    `[bench] ${CONNECTIONS} connections, ${SECONDS} s per endpoint after 2 s of warm-up; the demo scientist sees ${listed} analyses`,
  )
  console.log(`[bench] load average before: ${load()} (2 cores; other work on the machine counts)`)
  const endpoints: [string, string, Record<string, string>][] = [
    ['GET /api/health', '/api/health', {}],
    ['GET /api/v1/auth/me', '/api/v1/auth/me', headers],
    ['GET /api/v1/analyses', '/api/v1/analyses', headers],
  ]
  const rows: Row[] = []
  for (const [endpoint, path, sent] of endpoints) {
    await drive(server.base, path, sent, 2)
    const result = await drive(server.base, path, sent, SECONDS)
    rows.push({
      endpoint,
      requestsPerSecond: result.requests.average,
      p50: result.latency.p50,
      p99: result.latency.p99,
      errors: result.errors + result.non2xx + result.timeouts,
    })
  }
  const health = rows[0].requestsPerSecond
  console.log('\n| endpoint | requests/s | p50 | p99 | errors | requests/s ÷ health |')
  console.log('|---|---|---|---|---|---|')
  for (const row of rows)
    console.log(
      `| \`${row.endpoint}\` | ${Math.round(row.requestsPerSecond).toLocaleString('en-US')} | ${row.p50} ms | ${row.p99} ms | ${row.errors} | ${(row.requestsPerSecond / health).toFixed(2)} |`,
    )
  console.log(`\n[bench] load average after: ${load()}`)
  const list = rows[2]
  console.log(
    `[bench] target (list ≥ 1,000 requests/s, p99 < 300 ms): ${list.requestsPerSecond >= 1000 && list.p99 < 300 ? 'met' : 'not met'}`,
  )
} finally {
  server.stop()
  await new Promise((r) => server.process.once('exit', r))
  await dropDatabase(DATABASE)
}
