/**
 * Archive-bomb benchmark (`npm run bench:bombs [-- --port 3193] [-- --only NAME]`).
 *
 * Makes hostile workbooks with the tests' generator (tests/support/xlsx-files.ts) into .bench/bombs/:
 * a shared-strings part of 30 M entries (≈ 540 MB unpacked from ≈ 1.2 MB), one cell of 300 M and one
 * of 600 M characters (≈ 290 KB and ≈ 580 KB files), a sheet padded with 100 M empty elements, and
 * the shared-strings bomb again with a table of contents that lies about its size. For each case it
 * starts a server of its own (database nestwise_bench_bombs, UPLOAD_MAX_MB=250), uploads the file through
 * the real route, and prints the answer, the time to it, and the server's peak resident memory
 * (VmHWM); then the same with four uploads at once. An ordinary workbook of 20,000 rows is uploaded
 * first on each server as the reference: its time, and the peak memory before the bomb arrives.
 * Targets: each bomb refused (4xx naming the limit) in under 2 s; peak RSS under 600 MB, also with
 * four at once.
 */
import { mkdirSync, readFileSync, writeFileSync, existsSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { loadavg } from 'node:os'
import {
  cellsWorkbook,
  hugeCellWorkbook,
  paddedSheetBomb,
  sharedStringsBomb,
} from '../../tests/support/xlsx-files'
import { signInAsDemoScientist, startBenchServer, waitForHealth } from './bench-server'
import { postMultipart } from './post-multipart'

const args = process.argv.slice(2)
const option = (name: string) => {
  const at = args.indexOf(`--${name}`)
  return at >= 0 ? args[at + 1] : undefined
}
const PORT = Number(option('port') ?? 3193)
const ONLY = option('only')
const DATABASE = 'nestwise_bench_bombs'

process.env.PGDATABASE = DATABASE
process.env.NODE_ENV = 'test'
const { ensurePostgres } = await import('../lib/postgres')
const { dropDatabase, prepareDatabase } = await import('../lib/database')

const dir = resolve('.bench/bombs')
mkdirSync(dir, { recursive: true })

async function made(name: string, make: () => Promise<Buffer>): Promise<string> {
  const path = join(dir, name)
  if (!existsSync(path)) writeFileSync(path, await make())
  return path
}

const cases: { name: string; path: string }[] = [
  {
    name: 'shared strings, 30 M entries',
    path: await made('shared-strings-30M.xlsx', () => sharedStringsBomb(30_000_000)),
  },
  {
    name: 'one cell of 300 M characters',
    path: await made('cell-300M-shared.xlsx', () => hugeCellWorkbook(300_000_000, 'shared')),
  },
  {
    name: 'one cell of 600 M characters',
    path: await made('cell-600M-inline.xlsx', () => hugeCellWorkbook(600_000_000, 'inline')),
  },
  {
    name: 'sheet padded with 100 M elements',
    path: await made('padded-sheet-100M.xlsx', () => paddedSheetBomb(100_000_000)),
  },
  {
    name: 'shared strings, sizes lied about',
    path: await made('shared-strings-30M-lying.xlsx', () => sharedStringsBomb(30_000_000, { lie: true })),
  },
].filter((c) => !ONLY || c.name.includes(ONLY))
process.setMaxListeners(40)
const reference = await made('cells-20000.xlsx', () => cellsWorkbook(20_000))

const seconds = (ms: number) => `${(ms / 1000).toFixed(2)} s`
const size = (path: string) => `${(readFileSync(path).length / 1024).toFixed(0)} KB`

function peakRssMb(pid: number): number {
  const match = /VmHWM:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'))
  return match ? Number(match[1]) / 1024 : NaN
}

function summary(status: number, body: string): string {
  try {
    const parsed = JSON.parse(body) as {
      error?: { message?: string; details?: { reason?: string; limit?: string } }
    }
    const error = parsed.error
    if (!error) return `${status}`
    return `${status} ${error.details?.reason ?? ''}${error.details?.limit ? `/${error.details.limit}` : ''}: ${error.message}`
  } catch {
    return `${status} ${body.slice(0, 120)}`
  }
}

ensurePostgres()
await prepareDatabase(DATABASE, { fresh: true, seed: true })
console.log(
  `[bench] load average at start: ${loadavg()
    .map((l) => l.toFixed(2))
    .join(' ')} (2 cores)`,
)

async function scenario(label: string, paths: string[]): Promise<void> {
  const server = startBenchServer({ database: DATABASE, port: PORT })
  try {
    await waitForHealth(server.base, 300)
    const { labId, headers } = await signInAsDemoScientist(server.base)
    const upload = (path: string, k: number) =>
      postMultipart(
        `${server.base}/api/v1/datasets`,
        headers,
        { labId: String(labId), projectName: 'Bomb benchmark', name: `${label} ${k}` },
        { path, name: 'book.xlsx' },
      )
    let started = performance.now()
    const ordinary = await upload(reference, 0)
    const referenceMs = performance.now() - started
    if (ordinary.status !== 201)
      throw new Error(`reference upload failed: ${summary(ordinary.status, ordinary.body)}`)
    const before = peakRssMb(server.process.pid!)
    started = performance.now()
    const answers = await Promise.all(
      paths.map(async (path, k) => {
        const res = await upload(path, k + 1)
        return { ms: performance.now() - started, text: summary(res.status, res.body) }
      }),
    )
    const after = peakRssMb(server.process.pid!)
    console.log(`\n${label} (${paths.length === 1 ? size(paths[0]) : `${paths.length} files at once`})`)
    for (const answer of answers) console.log(`  ${seconds(answer.ms).padStart(9)}  ${answer.text}`)
    console.log(
      `  reference: ordinary 20,000-row workbook stored in ${seconds(referenceMs)}; slowest answer / reference = ${(Math.max(...answers.map((a) => a.ms)) / referenceMs).toFixed(2)}`,
    )
    console.log(`  server peak RSS: ${before.toFixed(0)} MB before the bomb, ${after.toFixed(0)} MB after`)
  } finally {
    server.stop()
    await new Promise((r) => server.process.once('exit', r))
  }
}

for (const c of cases) await scenario(c.name, [c.path])
for (const c of cases.slice(0, 3)) await scenario(`${c.name}, four at once`, [c.path, c.path, c.path, c.path])
if (cases.length >= 4)
  await scenario(
    'four kinds at once',
    cases.slice(0, 4).map((c) => c.path),
  )
console.log(
  `\n[bench] load average at end: ${loadavg()
    .map((l) => l.toFixed(2))
    .join(' ')}`,
)
await dropDatabase(DATABASE)
