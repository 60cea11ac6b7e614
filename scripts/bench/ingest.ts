/**
 * Ingest benchmark (`npm run bench:ingest [-- --runs 3] [-- --rows 1000000] [-- --decimals 1] [-- --port 3197]`).
 *
 * 1. Writes a seeded, invented per-cell CSV (≈ 1,000,000 rows: lab, animal, condition, cell,
 *    neurite_length_um, soma_area_um2, measurements with `--decimals` digits after the point; with
 *    3 or more nearly every measurement is distinct, as in many instrument exports) into .bench/ingest/.
 * 2. Prepares its own database (nestwise_bench, fresh, migrated, demo people seeded), starts the
 *    server on its own port, signs in as a demo scientist and uploads the file through the real
 *    HTTP route (multipart, as the browser does) — timed from the first byte sent until the 201
 *    that says the rows are stored and profiled. The upload is sent by curl when it is installed:
 *    like psql it is a small C program, while a Node client spent ~0.3 s of CPU per upload on the
 *    same two cores the server and PostgreSQL share (see post-multipart.ts).
 * 3. Times `psql \copy` of the same file into a plain table of text columns (the floor), after
 *    each upload, so both meet the same machine; the first of each pair is reported apart.
 *    For each it prints the CPU time the whole machine spent (from /proc/stat): on a machine with
 *    few cores the upload's time follows the CPU that server, PostgreSQL and client need together.
 * 4. Reads the server's peak resident memory (VmHWM in /proc/<pid>/status) after the uploads.
 * 5. Tags the dataset through the API and times loadNestedColumns for the whole file.
 * Targets: upload-to-ready ≤ 1.5 × psql COPY; server peak RSS < 600 MB.
 */
import { spawnSync } from 'node:child_process'
import { closeSync, mkdirSync, openSync, readFileSync, statSync, writeSync } from 'node:fs'
import { join, resolve } from 'node:path'
import seedrandom from 'seedrandom'
import { availableParallelism } from 'node:os'
import { signInAsDemoScientist, startBenchServer, waitForHealth } from './bench-server'
import { postMultipart, uploadClient } from './post-multipart'
import { numberOption } from './number-option'

const RUNS = numberOption('runs', 3)
const ROWS = numberOption('rows', 1_000_000)
const PORT = numberOption('port', 3197)
const DECIMALS = numberOption('decimals', 1)
const DATABASE = 'nestwise_bench'

process.env.PGDATABASE = DATABASE
process.env.NODE_ENV = 'test'
const { config } = await import('../../server/config')
const { ensurePostgres } = await import('../lib/postgres')
const { prepareDatabase } = await import('../lib/database')

/** Invented consortium: 12 labs × 40 mice (labels reused across labs), vehicle or NW-117 per mouse. */
function writeBenchCsv(path: string, rows: number, decimals: number): number {
  const random = seedrandom('nestwise-ingest-bench')
  const normal = () => {
    let u = 0
    while (u === 0) u = random()
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random())
  }
  const fd = openSync(path, 'w')
  let text = 'lab,animal,condition,cell,neurite_length_um,soma_area_um2\n'
  let written = 0
  const perMouse = Math.max(1, Math.round(rows / (12 * 40)))
  outer: for (let lab = 1; lab <= 12; lab++) {
    const labShift = normal() * 8
    for (let mouse = 1; mouse <= 40; mouse++) {
      const condition = mouse % 2 ? 'vehicle' : 'NW-117'
      const mouseShift = normal() * 5 + (condition === 'NW-117' ? 6 : 0)
      const cells = lab === 12 && mouse === 40 ? rows - written : Math.round(perMouse * (0.5 + random()))
      for (let cell = 1; cell <= cells; cell++) {
        if (written === rows) break outer
        const length = 120 + labShift + mouseShift + normal() * 25
        const soma = 85 + normal() * 9
        text += `L${lab},m${mouse},${condition},${cell},${length.toFixed(decimals)},${soma.toFixed(decimals)}\n`
        written++
        if (text.length > 1 << 20) {
          writeSync(fd, text)
          text = ''
        }
      }
    }
  }
  writeSync(fd, text)
  closeSync(fd)
  return written
}

/** CPU time the whole machine has spent so far, in ms (user, nice, system, irq, softirq of /proc/stat). */
function machineCpuMs(): number {
  const fields = readFileSync('/proc/stat', 'utf8').split('\n')[0].trim().split(/\s+/).slice(1).map(Number)
  const ticks = fields[0] + fields[1] + fields[2] + fields[5] + fields[6]
  return ticks * 10 // USER_HZ is 100 on Linux
}

const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)]
const seconds = (ms: number) => `${(ms / 1000).toFixed(2)} s`

function peakRssMb(pid: number): number {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8')
  const match = /VmHWM:\s+(\d+) kB/.exec(status)
  return match ? Number(match[1]) / 1024 : NaN
}

const dir = resolve('.bench/ingest')
mkdirSync(dir, { recursive: true })
const csvPath = join(dir, DECIMALS === 1 ? `cells-${ROWS}.csv` : `cells-${ROWS}-${DECIMALS}dp.csv`)
let started = performance.now()
const written = writeBenchCsv(csvPath, ROWS, DECIMALS)
const bytes = statSync(csvPath).size
console.log(
  `[bench] wrote ${written.toLocaleString('en-US')} rows, ${(bytes / 1e6).toFixed(1)} MB in ${seconds(performance.now() - started)} → ${csvPath}`,
)

ensurePostgres()
await prepareDatabase(DATABASE, { fresh: true, seed: true })

const { base, process: server, stop: stopServer } = startBenchServer({ database: DATABASE, port: PORT })

try {
  await waitForHealth(base, 200)
  const { labId, headers } = await signInAsDemoScientist(base)

  const psqlEnv = { ...process.env, PGPASSWORD: config.PGPASSWORD }
  const psql = (command: string) => {
    const result = spawnSync(
      'psql',
      [
        '-h',
        config.PGHOST,
        '-p',
        String(config.PGPORT),
        '-U',
        config.PGUSER,
        '-d',
        DATABASE,
        '-v',
        'ON_ERROR_STOP=1',
        '-q',
        '-c',
        command,
      ],
      { env: psqlEnv, encoding: 'utf8' },
    )
    if (result.status !== 0) throw new Error(`psql failed: ${result.stderr}`)
  }
  const timedCopy = () => {
    psql(
      'DROP TABLE IF EXISTS bench_plain_copy; CREATE TABLE bench_plain_copy (lab text, animal text, condition text, cell text, neurite_length_um text, soma_area_um2 text)',
    )
    const start = performance.now()
    psql(`\\copy bench_plain_copy FROM '${csvPath}' (FORMAT csv, HEADER true)`)
    return performance.now() - start
  }

  // Run 0 is the first upload after the server started (code not yet optimised by the JIT) and
  // the first COPY; both are printed but left out of the medians. Uploads and COPYs alternate, so
  // both sides meet the same state of the machine and of PostgreSQL (checkpoints, caches).
  const uploadMs: number[] = []
  const copyMs: number[] = []
  const uploadCpuMs: number[] = []
  const copyCpuMs: number[] = []
  let firstUploadMs = 0
  let datasetId = 0
  for (let run = 0; run <= RUNS; run++) {
    const fields = { labId: String(labId), projectName: 'Ingest benchmark', name: `Benchmark run ${run}` }
    const cpuBefore = machineCpuMs()
    started = performance.now()
    const res = await postMultipart(`${base}/api/v1/datasets`, headers, fields, {
      path: csvPath,
      name: 'cells.csv',
    })
    const elapsed = performance.now() - started
    const cpuUpload = machineCpuMs() - cpuBefore
    const body = JSON.parse(res.body)
    if (res.status !== 201) throw new Error(`upload failed: ${res.status} ${res.body}`)
    const version = body.data.latestVersion
    if (version.rowCount !== written) throw new Error(`stored ${version.rowCount} rows, expected ${written}`)
    datasetId = body.data.id
    const cpuBeforeCopy = machineCpuMs()
    const copy = timedCopy()
    const cpuCopy = machineCpuMs() - cpuBeforeCopy
    if (run === 0) firstUploadMs = elapsed
    else {
      uploadMs.push(elapsed)
      copyMs.push(copy)
      uploadCpuMs.push(cpuUpload)
      copyCpuMs.push(cpuCopy)
    }
    console.log(
      `[bench] ${run === 0 ? 'first upload after start' : `upload ${run}`}: ${seconds(elapsed)} to ready (server ingest ${seconds(version.ingestMs)}, ${version.rowCount.toLocaleString('en-US')} rows); psql \\copy ${seconds(copy)}`,
    )
  }
  const peakMb = peakRssMb(server.pid!)

  psql('DROP TABLE IF EXISTS bench_plain_copy')

  const tagStart = performance.now()
  const tag = await fetch(`${base}/api/v1/datasets/${datasetId}/versions/1/tagging`, {
    method: 'PUT',
    headers: { ...headers, 'Content-Type': 'application/json' },
    body: JSON.stringify({
      responseColumns: ['neurite_length_um'],
      conditionColumn: 'condition',
      levels: ['lab', 'animal'],
    }),
  })
  if (!tag.ok) throw new Error(`tagging failed: ${tag.status} ${await tag.text()}`)
  const tagMs = performance.now() - tagStart
  const versionId = ((await tag.json()) as { data: { tagging: { versionId: number } } }).data.tagging
    .versionId

  const { loadNestedColumns } = await import('../../server/rows-store/read-back')
  const { db } = await import('../../server/db')
  const readMs: number[] = []
  let observed = 0
  for (let run = 1; run <= RUNS; run++) {
    started = performance.now()
    const columns = await loadNestedColumns(versionId, {
      response: 'neurite_length_um',
      conditions: ['condition'],
      covariates: [],
      levels: ['lab', 'animal'],
    })
    readMs.push(performance.now() - started)
    observed = columns.response.length
  }
  await db.destroy()

  const upload = median(uploadMs)
  const copy = median(copyMs)
  console.log('')
  console.log(
    `Ingest benchmark (${written.toLocaleString('en-US')} rows, ${(bytes / 1e6).toFixed(1)} MB, median of ${RUNS} runs after a first one)`,
  )
  console.log(
    `  upload to ready (HTTP, stored + profiled): ${seconds(upload)}   [${uploadMs.map(seconds).join(', ')}]`,
  )
  console.log(
    `  psql \\copy into a plain table:            ${seconds(copy)}   [${copyMs.map(seconds).join(', ')}]`,
  )
  console.log(`  ratio upload / psql:                       ${(upload / copy).toFixed(2)}   (target ≤ 1.5)`)
  console.log(
    `  machine CPU per upload / per psql \\copy:    ${seconds(median(uploadCpuMs))} / ${seconds(median(copyCpuMs))}   (${availableParallelism()} cores; upload sent by ${uploadClient})`,
  )
  console.log(
    `  first upload after the server started:     ${seconds(firstUploadMs)}   (ratio ${(firstUploadMs / copy).toFixed(2)}; left out of the median)`,
  )
  console.log(`  server peak RSS (VmHWM):                   ${peakMb.toFixed(0)} MB   (target < 600 MB)`)
  console.log(`  tagging check over all rows (HTTP):        ${seconds(tagMs)}`)
  console.log(
    `  loadNestedColumns, ${observed.toLocaleString('en-US')} rows:        ${seconds(median(readMs))}   [${readMs.map(seconds).join(', ')}]`,
  )
} finally {
  stopServer()
}
process.exit(0)
