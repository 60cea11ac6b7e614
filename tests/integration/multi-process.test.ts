import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import knex from 'knex'
import { register } from 'tsx/esm/api'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import knexConfig from '../../knexfile'
import { dropDatabase, prepareDatabase } from '../../scripts/lib/database'
import { demoPassword } from '../../seeds/data/demo-accounts'
import { startFakeS3, type RunningFakeS3 } from '../../server/originals/fake-s3-server'
import { FAKE_S3_CREDENTIALS } from '../../server/originals/originals-config'
import {
  startWeb,
  startWorker,
  stopProcess,
  waitReady,
  type AppProcess,
} from '../../scripts/lib/app-processes'
import { neuriteCsv } from './analyses-support'

/**
 * A deployment of several processes, as docs/deploy.md describes it: two web processes
 * (ANALYSIS_WORKERS=0) and two worker processes against one PostgreSQL database (of this file's
 * own, with the demo scenario) and one S3 store (the fake, started here as a real one would run),
 * behind a TLS-ending proxy (PUBLIC_URL https, TRUST_PROXY loopback; this test plays the proxy and
 * sends X-Forwarded-Proto itself).
 */
const DATABASE = `${process.env.NESTWISE_TEST_DB}_procs`
const PUBLIC_URL = 'https://nestwise.test'
const folder = mkdtempSync(join(tmpdir(), 'nestwise-procs-'))
let s3: RunningFakeS3
let webA: AppProcess
let webB: AppProcess
let workers: AppProcess[] = []
const admin = knex({
  ...knexConfig,
  connection: { ...(knexConfig.connection as object), database: DATABASE },
})

beforeAll(async () => {
  // knex imports the TypeScript migrations and seeds with Node's own import(), outside vitest's runner.
  const unregister = register()
  try {
    await prepareDatabase(DATABASE, { fresh: true, seed: true })
  } finally {
    await unregister()
  }
  s3 = await startFakeS3({ port: 0, dir: join(folder, 's3'), bucket: 'nestwise-procs' })
  const shared = {
    PGDATABASE: DATABASE,
    NODE_ENV: 'test',
    PUBLIC_URL,
    TRUST_PROXY: 'loopback',
    LOGIN_RATE_LIMIT: '1000',
    ORIGINALS_STORE: 's3',
    S3_ENDPOINT: s3.endpoint,
    S3_BUCKET: 'nestwise-procs',
    S3_ACCESS_KEY_ID: FAKE_S3_CREDENTIALS.accessKeyId,
    S3_SECRET_ACCESS_KEY: FAKE_S3_CREDENTIALS.secretAccessKey,
    DATA_DIR: join(folder, 'data'),
  }
  webA = startWeb('web A', { ...shared, ANALYSIS_WORKERS: '0' })
  webB = startWeb('web B', { ...shared, ANALYSIS_WORKERS: '0' })
  workers = [startWorker('worker 1', shared), startWorker('worker 2', shared)]
  await Promise.all([webA, webB, ...workers].map((p) => waitReady(p)))
}, 120_000)

afterAll(async () => {
  await Promise.all([webA, webB, ...workers].filter(Boolean).map((p) => stopProcess(p)))
  await admin.destroy()
  await s3?.close()
  await dropDatabase(DATABASE)
  rmSync(folder, { recursive: true, force: true })
}, 60_000)

/** What the proxy in front adds, and what the app's client sends on writes. */
const viaProxy = { 'X-Forwarded-Proto': 'https', 'X-Forwarded-For': '203.0.113.7' }
const writes = { Origin: PUBLIC_URL, 'X-Requested-With': 'nestwise' }

async function call(
  p: AppProcess,
  path: string,
  init: { method?: string; cookie?: string; body?: unknown } = {},
) {
  const headers: Record<string, string> = { ...viaProxy, ...(init.method ? writes : {}) }
  if (init.cookie) headers.Cookie = init.cookie
  let body: string | FormData | undefined
  if (init.body instanceof FormData) body = init.body
  else if (init.body !== undefined) {
    headers['Content-Type'] = 'application/json'
    body = JSON.stringify(init.body)
  }
  return fetch(`${p.base}${path}`, { method: init.method ?? 'GET', headers, body })
}

async function data<T>(res: Response): Promise<T> {
  const text = await res.text()
  if (!res.ok) throw new Error(`${res.status} ${text}`)
  return (JSON.parse(text) as { data: T }).data
}

async function signIn(p: AppProcess, email = 'sami@example.org') {
  const res = await call(p, '/api/v1/auth/login', { method: 'POST', body: { email, password: demoPassword } })
  const setCookie = res.headers.get('set-cookie') ?? ''
  const me = await data<{ memberships: { labId: number }[] }>(res)
  return { cookie: setCookie.split(';')[0], setCookie, labId: me.memberships[0].labId }
}

let session: Awaited<ReturnType<typeof signIn>>
let datasetId: number
const csv = Buffer.from(neuriteCsv({ seed: 'procs', mice: 24, minCells: 120, maxCells: 160 }))

describe('two web processes and two workers on one database and one bucket', () => {
  it('keeps a session made on web A working on web B, with a Secure cookie behind the https proxy', async () => {
    session = await signIn(webA)
    expect(session.setCookie).toMatch(/; Secure/i)
    expect(session.setCookie).toMatch(/HttpOnly/i)
    expect((await call(webB, '/api/v1/auth/me', { cookie: session.cookie })).status).toBe(200)
    // Signed out on B: the session is gone on A too (it lives in PostgreSQL).
    const other = await signIn(webB)
    expect((await call(webB, '/api/v1/auth/logout', { method: 'POST', cookie: other.cookie })).status).toBe(
      204,
    )
    expect((await call(webA, '/api/v1/auth/me', { cookie: other.cookie })).status).toBe(401)
  })

  it('serves an upload made through web A for download through web B, from the bucket', async () => {
    const form = new FormData()
    form.set('labId', String(session.labId))
    form.set('projectName', 'Several processes')
    form.set('file', new Blob([csv], { type: 'text/csv' }), 'procs.csv')
    const dataset = await data<{ id: number; latestVersion: { sha256: string } }>(
      await call(webA, '/api/v1/datasets', { method: 'POST', cookie: session.cookie, body: form }),
    )
    datasetId = dataset.id
    const download = await call(webB, `/api/v1/datasets/${dataset.id}/versions/1/original`, {
      cookie: session.cookie,
    })
    expect(download.status).toBe(200)
    expect(Buffer.compare(Buffer.from(await download.arrayBuffer()), csv)).toBe(0)
    const stored = await fetch(`${s3.endpoint}/nestwise-procs/${DATABASE}/${dataset.latestVersion.sha256}`)
    expect(stored.status).toBe(200)
  })

  it('runs an analysis created on web A in a worker, and shows it on web B', async () => {
    await data(
      await call(webA, `/api/v1/datasets/${datasetId}/versions/1/tagging`, {
        method: 'PUT',
        cookie: session.cookie,
        body: { responseColumns: ['neurite_length_um'], conditionColumn: 'treatment', levels: ['mouse'] },
      }),
    )
    const created = await data<{ id: number }>(
      await call(webA, '/api/v1/analyses', { method: 'POST', cookie: session.cookie, body: { datasetId } }),
    )
    const status = await finished(webB, created.id)
    expect(status).toMatchObject({ status: 'done', runMs: expect.any(Number) })
    const detail = await data<{ result: { nObs: number } }>(
      await call(webB, `/api/v1/analyses/${created.id}/versions/1`, { cookie: session.cookie }),
    )
    expect(detail.result.nObs).toBe(csv.toString().trim().split('\n').length - 1)
  })

  it('finishes a run on the other worker when the worker running it is killed (SIGKILL)', async () => {
    const created = await data<{ id: number }>(
      await call(webA, '/api/v1/analyses', {
        method: 'POST',
        cookie: session.cookie,
        body: {
          datasetId,
          name: 'Run through a crash',
          settings: { bootstrap: { enabled: true, resamples: 10_000, seed: 'crash' } },
        },
      }),
    )
    const { id: versionId } = await admin('analysis_versions').where({ analysis_id: created.id }).first('id')
    const holder = await lockHolder(versionId)
    const victim = workers.find((w) => w.child.pid === holder)!
    expect(victim, `run-lock holder ${holder}`).toBeDefined()
    victim.child.kill('SIGKILL')
    await new Promise((resolve) => victim.child.once('exit', resolve))
    const survivor = workers.find((w) => w !== victim)!

    const status = await finished(webB, created.id)
    expect(status.status, JSON.stringify(status.error)).toBe('done')
    const row = await admin('analysis_versions').where({ id: versionId }).first('attempts')
    expect(row.attempts).toBe(2)
    // The survivor is still healthy; the killed one answers nothing.
    expect((await fetch(`${survivor.base}/health/ready`)).status).toBe(200)
    await expect(fetch(`${victim.base}/health/live`)).rejects.toThrow()
  })
})

/**
 * The pid of the worker whose run lock is held for `versionId`, once a worker has started it and
 * its claim is committed (the lock is taken inside the claim's transaction: a process killed
 * before the commit leaves the version queued, its try not counted).
 */
async function lockHolder(versionId: number, timeoutMs = 30_000): Promise<number> {
  const deadline = Date.now() + timeoutMs
  while (Date.now() < deadline) {
    const { rows } = await admin.raw(
      `SELECT a.application_name FROM pg_locks l JOIN pg_stat_activity a ON a.pid = l.pid
        WHERE l.locktype = 'advisory' AND l.objsubid = 2 AND l.objid = ?
          AND a.application_name LIKE 'nestwise-run-locks-%'
          AND EXISTS (SELECT 1 FROM analysis_versions v WHERE v.id = ? AND v.status = 'running')`,
      [versionId, versionId],
    )
    const name = (rows as { application_name: string }[])[0]?.application_name
    if (name) return Number(name.slice('nestwise-run-locks-'.length))
    await new Promise((resolve) => setTimeout(resolve, 25))
  }
  throw new Error(`no worker started version ${versionId}`)
}

interface Status {
  status: string
  runMs: number | null
  error: unknown
}

async function finished(p: AppProcess, analysisId: number, timeoutMs = 45_000): Promise<Status> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const status = await data<Status>(
      await call(p, `/api/v1/analyses/${analysisId}/versions/1/status`, { cookie: session.cookie }),
    )
    if (status.status === 'done' || status.status === 'failed') return status
    if (Date.now() > deadline) {
      const rows = await admin('analysis_versions')
        .where({ analysis_id: analysisId })
        .select('status', 'attempts', 'job_id')
      const logs = workers.map((w) => `--- ${w.name}\n${w.output().slice(-3000)}`).join('\n')
      throw new Error(`analysis ${analysisId} still ${status.status}: ${JSON.stringify(rows)}\n${logs}`)
    }
    await new Promise((resolve) => setTimeout(resolve, 100))
  }
}
