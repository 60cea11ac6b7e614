import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { AnalysisSettings } from '../../shared/schemas/analyses'
import { ENGINE_VERSION } from '../../shared/stats/engine-version'
import { computeAnalysis } from '../../server/analysis/compute-analysis'
import { db } from '../../server/db'
import { fetchRun, jobState, type QueuedRun } from '../../server/queue/analysis-queue'
import { startAnalysisRunner, stopAnalysisRunner } from '../../server/jobs/analysis-runner'
import { insertAnalysis, insertAnalysisVersion } from '../../server/repositories/analyses.repo'
import { recordProgress, startRun } from '../../server/repositories/analysis-jobs.repo'
import { RunLocks } from '../../server/repositories/analysis-run-locks.repo'
import {
  adoptVersionsWithoutJob,
  claimNextRun,
  queueVersion,
  storeOutcome,
  takeBackOrphanedRuns,
} from '../../server/services/analysis-runs.service'
import { closeConnections, createTestApp } from '../support/api'
import { neuriteCsv, taggedDataset } from './analyses-support'
import { signedInTeam } from './datasets-support'

const app = createTestApp()
let team: Awaited<ReturnType<typeof signedInTeam>>
let dataset: Awaited<ReturnType<typeof taggedDataset>> & { projectId: number }
const settings = AnalysisSettings.parse({
  response: 'neurite_length_um',
  conditions: ['treatment'],
  levels: ['mouse'],
})
const slowSettings = { ...settings, bootstrap: { enabled: true, resamples: 10_000, seed: 'slow' } }

/** Jobs fetched while looking for another version's, kept for when that one is asked for. */
const fetchedEarlier = new Map<number, QueuedRun>()

/** Fetches waiting jobs (a runner of another test file may have left some) until `versionId`'s. */
async function fetchJobOf(versionId: number): Promise<QueuedRun> {
  const earlier = fetchedEarlier.get(versionId)
  if (earlier && fetchedEarlier.delete(versionId)) return earlier
  for (let i = 0; i < 50; i++) {
    const job = await fetchRun()
    if (job?.versionId === versionId) return job
    if (job) fetchedEarlier.set(job.versionId, job)
    else await new Promise((resolve) => setTimeout(resolve, 50))
  }
  throw new Error(`no job for version ${versionId}`)
}

beforeAll(async () => {
  team = await signedInTeam(app)
  const uploaded = await taggedDataset(app, team.cookies.scientist, team.lab.id, neuriteCsv({ seed: 'jobs' }))
  const { project_id } = await db('datasets').where({ id: uploaded.id }).first('project_id')
  dataset = { ...uploaded, projectId: project_id }
  // Earlier test files may have left versions waiting; fail them out of the way first.
  await db('analysis_versions')
    .whereIn('status', ['queued', 'running'])
    .update({ status: 'failed', error: JSON.stringify({ code: 'INTERNAL', message: 'cleared by a test' }) })
})

afterAll(async () => {
  await stopAnalysisRunner()
  await closeConnections()
})

/** A version of a new analysis, written straight to the tables; queued (with its job) unless told. */
async function newVersion(options: { queue?: boolean; settings?: object } = {}): Promise<number> {
  const analysisId = await insertAnalysis({
    labId: team.lab.id,
    projectId: dataset.projectId,
    datasetId: dataset.id,
    name: `job ${randomUUID()}`,
    createdBy: team.scientist.id,
  })
  return db.transaction(async (trx) => {
    const id = await insertAnalysisVersion(
      {
        analysisId,
        versionNo: 1,
        datasetVersionId: dataset.latestVersion.id,
        datasetSha256: dataset.latestVersion.sha256,
        settings: (options.settings ?? settings) as AnalysisSettings,
        exclusions: [],
        engineVersion: ENGINE_VERSION,
        createdBy: team.scientist.id,
      },
      trx,
    )
    if (options.queue ?? true) await queueVersion(id, trx)
    return id
  })
}

/** Starts a job fetched here (as a runner's claim does, without its lock). */
const beginRun = (job: QueuedRun, claimToken: string) => startRun({ ...job, claimToken })

const rowOf = (id: number) => db('analysis_versions').where({ id }).first()
const failed = { kind: 'failed' as const, error: { code: 'INTERNAL' as const, message: 'done with it' } }

async function waitFor(check: () => Promise<boolean>, what: string, ms = 60_000): Promise<void> {
  const deadline = Date.now() + ms
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`)
    await new Promise((resolve) => setTimeout(resolve, 50))
  }
}

describe('the queue (pg-boss)', () => {
  it('gives each version one job, and each job to exactly one of several fetchers', async () => {
    // Jobs another test file left waiting would be fetched first (oldest first): set them aside.
    for (let job = await fetchRun(); job; job = await fetchRun()) fetchedEarlier.set(job.versionId, job)
    const ids = await Promise.all([1, 2, 3, 4].map(() => newVersion()))
    const jobIds = await Promise.all(ids.map(async (id) => (await rowOf(id)).job_id))
    expect(jobIds.every((id) => typeof id === 'string')).toBe(true)
    // A second job for a waiting version is refused (one per version).
    await db.transaction((trx) => queueVersion(ids[0], trx))
    expect((await rowOf(ids[0])).job_id).toBe(jobIds[0])
    expect(await jobState(jobIds[0])).toBe('created')

    const fetched = (await Promise.all(Array.from({ length: 6 }, () => fetchRun()))).filter((j) => j !== null)
    expect(fetched.map((j) => j.versionId).sort()).toEqual([...ids].sort())
    expect(new Set(fetched.map((j) => j.jobId)).size).toBe(4)
    for (const job of fetched) {
      expect(job.tryNo).toBe(1)
      const run = (await beginRun(job, randomUUID()))!
      expect(run).toMatchObject({
        versionId: job.versionId,
        datasetVersionId: dataset.latestVersion.id,
        settings,
      })
      expect(await rowOf(job.versionId)).toMatchObject({ status: 'running', attempts: 1 })
      expect(await storeOutcome(run, failed)).toBe(true)
      expect(await jobState(job.jobId)).toBe('completed')
    }
  })

  it('ignores writes from a run that is no longer the version’s', async () => {
    const id = await newVersion()
    const job = await fetchJobOf(id)
    const first = (await beginRun(job, randomUUID()))!
    expect(await recordProgress(id, first.claimToken, { stage: 'fitting', fraction: 0.5 })).toBe(true)
    // The same job started again under another token (as after the first run's process was given up on).
    const second = (await beginRun(job, randomUUID()))!
    expect(await recordProgress(id, first.claimToken, { stage: 'charts', fraction: 0.9 })).toBe(false)
    const computed = await computeAnalysis(
      { datasetVersionId: dataset.latestVersion.id, settings, exclusions: [] },
      db,
    )
    expect(await storeOutcome(first, { kind: 'done', ...computed })).toBe(false)
    expect(await jobState(job.jobId)).toBe('active')
    expect(await storeOutcome(second, { kind: 'done', ...computed })).toBe(true)
    expect(await rowOf(id)).toMatchObject({ status: 'done', claim_token: null })
    expect(await jobState(job.jobId)).toBe('completed')
  })

  it('gives a queued version without a job (queued before pg-boss) a job of its own', async () => {
    const id = await newVersion({ queue: false })
    expect((await rowOf(id)).job_id).toBeNull()
    expect(await adoptVersionsWithoutJob()).toBe(1)
    const row = await rowOf(id)
    expect(row).toMatchObject({ status: 'queued', progress: { stage: 'queued', fraction: 0 } })
    expect(await jobState(row.job_id)).toBe('created')
    const job = await fetchJobOf(id)
    await storeOutcome((await beginRun(job, randomUUID()))!, failed)
  })
})

describe('claiming the next run', () => {
  it('holds the version’s run lock before marking it running, and leaves a version locked elsewhere waiting', async () => {
    const id = await newVersion()
    // Another live process holds this version's lock (as when pg-boss expired a run still going).
    const elsewhere = new RunLocks(() => {})
    expect(await elsewhere.hold(id)).toBe(true)
    const here = new RunLocks(() => {})
    try {
      let claim = await claimNextRun(randomUUID(), (versionId) => here.hold(versionId))
      while (claim.kind === 'stale')
        claim = await claimNextRun(randomUUID(), (versionId) => here.hold(versionId))
      expect(claim).toMatchObject({ kind: 'busy', job: { versionId: id, tryNo: 1 } })
      // Rolled back: the job waits, the version is still queued.
      expect(await jobState((await rowOf(id)).job_id)).toBe('created')
      expect((await rowOf(id)).status).toBe('queued')

      await elsewhere.release(id)
      claim = await claimNextRun(randomUUID(), (versionId) => here.hold(versionId))
      expect(claim).toMatchObject({ kind: 'run', job: { versionId: id, tryNo: 1 } })
      expect((await rowOf(id)).status).toBe('running')
      // Held: no one takes it back.
      expect(await takeBackOrphanedRuns()).toEqual([])
      if (claim.kind === 'run') expect(await storeOutcome(claim.run, failed)).toBe(true)
    } finally {
      await Promise.all([here.close(), elsewhere.close()])
    }
  })
})

describe('a run whose process is gone', () => {
  it('is taken back while its lock is free, left alone while held, and failed after three starts', async () => {
    const id = await newVersion()
    for (const tryNo of [1, 2, 3]) {
      const job = await fetchJobOf(id)
      expect(job.tryNo).toBe(tryNo)
      // A process of its own: its run lock lives on its own connection, as in a worker.
      const process = new RunLocks(() => {})
      expect(await process.hold(id)).toBe(true)
      expect(await beginRun(job, randomUUID())).not.toBeNull()
      expect(await takeBackOrphanedRuns()).toEqual([])
      expect((await rowOf(id)).status).toBe('running')
      // The process dies: PostgreSQL drops its connection and with it the lock.
      await process.close()
      const taken = await takeBackOrphanedRuns()
      expect(taken).toEqual([{ id, now: tryNo < 3 ? 'queued' : 'failed' }])
      expect((await rowOf(id)).attempts).toBe(tryNo)
    }
    const row = await rowOf(id)
    expect(row).toMatchObject({
      status: 'failed',
      progress: { stage: 'failed', fraction: 1 },
      error: { code: 'INTERNAL', message: expect.stringContaining('3 times') },
    })
    expect(row.finished_at).not.toBeNull()
    expect(await jobState(row.job_id)).toBe('failed')
  })
})

describe('the run itself', () => {
  it('reports reading, fitting, bootstrap and charts in that order (the bootstrap only when asked for)', async () => {
    const input = { datasetVersionId: dataset.latestVersion.id, settings, exclusions: [] }
    const plain: string[] = []
    await computeAnalysis(input, db, (p) => plain.push(p.stage))
    expect(plain).toEqual(['reading', 'fitting', 'charts'])
    const withBootstrap: { stage: string; fraction: number }[] = []
    const run = await computeAnalysis(
      { ...input, settings: { ...settings, bootstrap: { enabled: true, resamples: 200, seed: 'x' } } },
      db,
      (p) => withBootstrap.push(p),
    )
    expect(withBootstrap.map((p) => p.stage)).toEqual(['reading', 'fitting', 'bootstrap', 'charts'])
    const fractions = withBootstrap.map((p) => p.fraction)
    expect(fractions).toEqual([...fractions].sort((a, b) => a - b))
    expect(run.result.comparisons.bootstrap?.resamples).toBe(200)
  })
})

describe('the runner', () => {
  it('takes back a run left by a dead process and finishes it', async () => {
    const orphan = await newVersion()
    const job = await fetchJobOf(orphan)
    const dead = new RunLocks(() => {})
    await dead.hold(orphan)
    await beginRun(job, randomUUID())
    await dead.close()
    startAnalysisRunner({ pollMs: 100, reapEveryMs: 300 })
    await waitFor(
      async () => ['done', 'failed'].includes((await rowOf(orphan)).status),
      'the orphan to finish',
    )
    const row = await rowOf(orphan)
    expect(row.status, JSON.stringify(row.error)).toBe('done')
    expect(row.attempts).toBe(2)
    expect(row.result.engine.version).toBe(ENGINE_VERSION)
    expect(await jobState(job.jobId)).toBe('completed')
  })

  it('hands a run in flight back to the queue when it stops, as a fresh job', async () => {
    const id = await newVersion({ settings: slowSettings })
    await waitFor(async () => (await rowOf(id)).status === 'running', 'the run to start', 30_000)
    const { job_id: before } = await rowOf(id)
    await stopAnalysisRunner()
    const row = await rowOf(id)
    expect(row).toMatchObject({
      status: 'queued',
      claim_token: null,
      progress: { stage: 'queued', fraction: 0 },
    })
    expect(row.job_id).not.toBe(before)
    expect(await jobState(before)).toBe('completed')
    // The hand-back is not counted as a try.
    const job = await fetchJobOf(id)
    expect(job.tryNo).toBe(1)
    await storeOutcome((await beginRun(job, randomUUID()))!, failed)
  })

  it('runs as many versions at once as its concurrency, each in its own thread', async () => {
    const ids = [await newVersion({ settings: slowSettings }), await newVersion({ settings: slowSettings })]
    startAnalysisRunner({ pollMs: 100, reapEveryMs: 300, concurrency: 2 })
    await waitFor(
      async () =>
        (await db('analysis_versions').whereIn('id', ids).where({ status: 'running' })).length === 2,
      'both runs to be running at once',
    )
    await stopAnalysisRunner()
    for (const id of ids) {
      if ((await rowOf(id)).status !== 'queued') continue
      const job = await fetchJobOf(id)
      await storeOutcome((await beginRun(job, randomUUID()))!, failed)
    }
  })

  it('stops a run at the time limit and fails it without trying again', async () => {
    const id = await newVersion({ settings: slowSettings })
    startAnalysisRunner({ pollMs: 100, reapEveryMs: 300, maxRunMs: 250 })
    await waitFor(async () => ['done', 'failed'].includes((await rowOf(id)).status), 'the run to end')
    const row = await rowOf(id)
    expect(row.error).toMatchObject({
      code: 'INTERNAL',
      message: 'The analysis took longer than 0.25 seconds and was stopped.',
    })
    expect(row.attempts).toBe(1)
    expect(await jobState(row.job_id)).toBe('completed')
    await stopAnalysisRunner()
  })
})
