/**
 * Analyses per worker process (`npm run bench:workers [-- --analyses 20]`): prints figures, it is
 * not a timed test.
 *
 * 1. Writes the seeded, invented ≈1M-row consortium table of the engine benchmark into
 *    .bench/analysis/ unless it is already there (the file bench:analysis uses).
 * 2. Its own database (nestwise_bench_workers, the demo scenario), one web process with
 *    ANALYSIS_WORKERS=0, the table uploaded and tagged (lab › animal, treatment) through the API.
 * 3. With one worker process (ANALYSIS_WORKERS=1), then with two: queues `--analyses` analyses of
 *    that table at once and times them from the first request to the last one done.
 * Prints both wall times, their ratio, the median run of one analysis inside a worker, the median
 * create request (it checks the settings against the kept rows), and the load average before and after each phase (2 cores here; other work on the machine counts).
 */
import { loadavg } from 'node:os'
import { signInAsDemoScientist } from './bench-server'
import { benchCsv } from './generate-nested-csv'
import { postMultipart } from './post-multipart'
import { numberOption } from './number-option'

const ANALYSES = numberOption('analyses', 20)
const DATABASE = 'nestwise_bench_workers'

process.env.PGDATABASE = DATABASE
process.env.NODE_ENV = 'test'
const { ensurePostgres } = await import('../lib/postgres')
const { prepareDatabase, dropDatabase } = await import('../lib/database')
const { startWeb, startWorker, stopProcess, waitReady } = await import('../lib/app-processes')

const seconds = (ms: number) => `${(ms / 1000).toFixed(1)} s`
const load = () =>
  loadavg()
    .map((l) => l.toFixed(2))
    .join(' ')
const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)]

const csvPath = benchCsv()

ensurePostgres()
await prepareDatabase(DATABASE, { fresh: true, seed: true })
const env = { PGDATABASE: DATABASE, NODE_ENV: 'test', LOGIN_RATE_LIMIT: '1000', UPLOAD_MAX_MB: '250' }
const web = startWeb('web', { ...env, ANALYSIS_WORKERS: '0' })
const running = [web]

try {
  await waitReady(web)
  const { cookie, labId, headers } = await signInAsDemoScientist(web.base)
  const api = async <T>(path: string, method = 'GET', body?: unknown): Promise<T> => {
    const res = await fetch(`${web.base}/api/v1${path}`, {
      method,
      headers: { ...headers, Cookie: cookie, ...(body ? { 'Content-Type': 'application/json' } : {}) },
      body: body ? JSON.stringify(body) : undefined,
    })
    if (!res.ok) throw new Error(`${method} ${path}: ${res.status} ${await res.text()}`)
    return ((await res.json()) as { data: T }).data
  }
  const upload = await postMultipart(
    `${web.base}/api/v1/datasets`,
    headers,
    { labId: String(labId), projectName: 'Worker benchmark', name: 'Benchmark consortium' },
    { path: csvPath, name: 'cells.csv' },
  )
  if (upload.status !== 201) throw new Error(`upload failed: ${upload.status} ${upload.body}`)
  const dataset = JSON.parse(upload.body).data as { id: number; latestVersion: { rowCount: number } }
  await api(`/datasets/${dataset.id}/versions/1/tagging`, 'PUT', {
    responseColumns: ['neurite_length_um'],
    conditionColumn: 'treatment',
    levels: ['lab', 'animal'],
  })
  console.log(
    `[bench] ${dataset.latestVersion.rowCount.toLocaleString('en-US')} rows uploaded; ${ANALYSES} analyses per phase`,
  )

  async function phase(
    workerCount: number,
  ): Promise<{ wallMs: number; runMs: number[]; createMs: number[] }> {
    const workers = Array.from({ length: workerCount }, (_, i) =>
      startWorker(`worker ${i + 1}`, { ...env, ANALYSIS_WORKERS: '1' }),
    )
    running.push(...workers)
    await Promise.all(workers.map((w) => waitReady(w)))
    // Let the workers' threads load the engine before the clock starts.
    await new Promise((r) => setTimeout(r, 2000))
    console.log(`[bench] ${workerCount} worker process(es): load average before ${load()}`)
    const started = performance.now()
    const ids: number[] = []
    const createMs: number[] = []
    for (let k = 0; k < ANALYSES; k++) {
      const asked = performance.now()
      const created = await api<{ id: number }>('/analyses', 'POST', {
        datasetId: dataset.id,
        name: `Benchmark ${workerCount}-${k + 1}`,
        settings: { reference: { treatment: 'vehicle' } },
      })
      createMs.push(performance.now() - asked)
      ids.push(created.id)
    }
    const runMs = new Map<number, number>()
    while (runMs.size < ids.length) {
      for (const id of ids.filter((i) => !runMs.has(i))) {
        const status = await api<{ status: string; runMs: number | null }>(
          `/analyses/${id}/versions/1/status`,
        )
        if (status.status === 'failed') throw new Error(`analysis ${id} failed`)
        if (status.status === 'done') runMs.set(id, status.runMs ?? 0)
      }
      await new Promise((r) => setTimeout(r, 250))
    }
    const wallMs = performance.now() - started
    console.log(
      `[bench] ${workerCount} worker process(es): ${ANALYSES} analyses in ${seconds(wallMs)}; load average after ${load()}`,
    )
    await Promise.all(workers.map((w) => stopProcess(w)))
    return { wallMs, runMs: [...runMs.values()], createMs }
  }

  const one = await phase(1)
  const two = await phase(2)
  console.log('\n| worker processes | wall time | median run inside a worker | analyses/min |')
  console.log('|---|---|---|---|')
  for (const [n, r] of [
    [1, one],
    [2, two],
  ] as const)
    console.log(
      `| ${n} | ${seconds(r.wallMs)} | ${seconds(median(r.runMs))} | ${((ANALYSES / r.wallMs) * 60_000).toFixed(1)} |`,
    )
  console.log(
    `\n[bench] creating one analysis (the request, with its checks against the kept rows): median ${Math.round(median([...one.createMs, ...two.createMs]))} ms`,
  )
  console.log(
    `[bench] wall time, two workers ÷ one: ${(two.wallMs / one.wallMs).toFixed(2)} (speed-up ${(one.wallMs / two.wallMs).toFixed(2)}×)`,
  )
} finally {
  await Promise.all(running.map((p) => stopProcess(p)))
  await dropDatabase(DATABASE)
}
process.exit(0)
