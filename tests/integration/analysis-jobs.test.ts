import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { AnalysisSettings } from '../../shared/schemas/analyses'
import { ENGINE_VERSION } from '../../shared/stats/engine-version'
import { computeAnalysis } from '../../server/analysis/compute-analysis'
import { db } from '../../server/db'
import { startAnalysisRunner, stopAnalysisRunner } from '../../server/jobs/analysis-runner'
import { insertAnalysis, insertAnalysisVersion } from '../../server/repositories/analyses.repo'
import {
  claimNextJob,
  failJob,
  finishJob,
  reclaimStaleJobs,
  recordProgress,
} from '../../server/repositories/analysis-jobs.repo'
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

beforeAll(async () => {
  team = await signedInTeam(app)
  const uploaded = await taggedDataset(app, team.cookies.scientist, team.lab.id, neuriteCsv({ seed: 'jobs' }))
  const { project_id } = await db('datasets').where({ id: uploaded.id }).first('project_id')
  dataset = { ...uploaded, projectId: project_id }
  // Earlier test files may have left queued jobs behind; run them out of the way first.
  await db('analysis_versions')
    .whereIn('status', ['queued', 'running'])
    .update({ status: 'failed', error: JSON.stringify({ code: 'INTERNAL', message: 'cleared by a test' }) })
})

afterAll(async () => {
  await stopAnalysisRunner()
  await closeConnections()
})

/** A queued version of a new analysis, written straight to the tables (no runner is running yet). */
async function queuedVersion(extra: Record<string, unknown> = {}): Promise<number> {
  const analysisId = await insertAnalysis({
    labId: team.lab.id,
    projectId: dataset.projectId,
    datasetId: dataset.id,
    name: `job ${randomUUID()}`,
    createdBy: team.scientist.id,
  })
  const id = await insertAnalysisVersion({
    analysisId,
    versionNo: 1,
    datasetVersionId: dataset.latestVersion.id,
    datasetSha256: dataset.latestVersion.sha256,
    settings,
    exclusions: [],
    engineVersion: ENGINE_VERSION,
    createdBy: team.scientist.id,
  })
  if (Object.keys(extra).length) await db('analysis_versions').where({ id }).update(extra)
  return id
}

const rowOf = (id: number) => db('analysis_versions').where({ id }).first()

describe('the job queue', () => {
  it('gives each queued job to exactly one of several concurrent claimers (FOR UPDATE SKIP LOCKED)', async () => {
    const ids = await Promise.all([1, 2, 3, 4].map(() => queuedVersion()))
    const claims = await Promise.all(Array.from({ length: 6 }, () => claimNextJob(randomUUID())))
    const claimed = claims.filter((c) => c !== null).map((c) => c!.id)
    expect(claimed.sort()).toEqual([...ids].sort())
    expect(new Set(claimed).size).toBe(claimed.length)
    for (const claim of claims.filter((c) => c !== null)) {
      expect(claim!).toMatchObject({ attempts: 1, datasetVersionId: dataset.latestVersion.id, settings })
      expect(await rowOf(claim!.id)).toMatchObject({ status: 'running', claim_token: claim!.claimToken })
      await failJob(claim!.id, claim!.claimToken, { code: 'INTERNAL', message: 'done with it' })
    }
  })

  it('ignores writes from a runner whose claim was taken back', async () => {
    const id = await queuedVersion()
    const claim = (await claimNextJob(randomUUID()))!
    expect(claim.id).toBe(id)
    expect(await recordProgress(id, claim.claimToken, { stage: 'fitting', fraction: 0.5 })).toBe(true)
    expect(await recordProgress(id, randomUUID(), { stage: 'charts', fraction: 0.9 })).toBe(false)
    expect((await rowOf(id)).progress).toEqual({ stage: 'fitting', fraction: 0.5 })
    await db('analysis_versions')
      .where({ id })
      .update({ heartbeat_at: db.raw(`now() - interval '1 hour'`) })
    expect(await reclaimStaleJobs(60_000, 3)).toEqual([{ id, status: 'queued' }])
    expect(await rowOf(id)).toMatchObject({
      status: 'queued',
      claim_token: null,
      progress: { stage: 'queued', fraction: 0 },
      attempts: 1,
    })
    const computed = await computeAnalysis(
      { datasetVersionId: dataset.latestVersion.id, settings, exclusions: [] },
      db,
    )
    expect(await finishJob(id, claim.claimToken, computed)).toBe(false)
    expect((await rowOf(id)).status).toBe('queued')
    // Out of the way for the next tests.
    const again = (await claimNextJob(randomUUID()))!
    await failJob(again.id, again.claimToken, { code: 'INTERNAL', message: 'done with it' })
  })

  it('leaves fresh heartbeats alone and fails a job that has died too often', async () => {
    const fresh = await queuedVersion({
      status: 'running',
      heartbeat_at: db.fn.now(),
      claim_token: randomUUID(),
      attempts: 1,
    })
    const dying = await queuedVersion({
      status: 'running',
      heartbeat_at: db.raw(`now() - interval '10 minutes'`),
      claim_token: randomUUID(),
      attempts: 3,
    })
    expect(await reclaimStaleJobs(60_000, 3)).toEqual([{ id: dying, status: 'failed' }])
    expect((await rowOf(fresh)).status).toBe('running')
    const failed = await rowOf(dying)
    expect(failed).toMatchObject({
      status: 'failed',
      error: { code: 'INTERNAL', message: expect.stringContaining('3 times') },
    })
    expect(failed.finished_at).not.toBeNull()
    await db('analysis_versions')
      .where({ id: fresh })
      .update({ status: 'failed', error: JSON.stringify({ code: 'INTERNAL', message: 'test over' }) })
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

describe('the runner after a crash', () => {
  it('takes back a job left running by a dead process and finishes it', async () => {
    // As a killed server leaves it: running, claimed, heartbeat long gone.
    const orphan = await queuedVersion({
      status: 'running',
      heartbeat_at: db.raw(`now() - interval '5 minutes'`),
      claim_token: randomUUID(),
      attempts: 1,
      started_at: db.raw(`now() - interval '5 minutes'`),
    })
    startAnalysisRunner({ pollMs: 100, leaseMs: 2000, heartbeatMs: 300 })
    const deadline = Date.now() + 60_000
    let row = await rowOf(orphan)
    while (row.status !== 'done' && row.status !== 'failed' && Date.now() < deadline) {
      await new Promise((resolve) => setTimeout(resolve, 100))
      row = await rowOf(orphan)
    }
    expect(row.status, JSON.stringify(row.error)).toBe('done')
    expect(row.attempts).toBe(2)
    expect(row.result.engine.version).toBe(ENGINE_VERSION)
  })

  it('hands a job in flight back to the queue when the runner stops', async () => {
    // A large bootstrap keeps the job running long enough to stop the runner in the middle.
    const id = await queuedVersion({
      settings: JSON.stringify({
        ...settings,
        bootstrap: { enabled: true, resamples: 10_000, seed: 'slow' },
      }),
    })
    const deadline = Date.now() + 30_000
    while ((await rowOf(id)).status !== 'running' && Date.now() < deadline)
      await new Promise((resolve) => setTimeout(resolve, 20))
    await stopAnalysisRunner()
    expect(await rowOf(id)).toMatchObject({
      status: 'queued',
      claim_token: null,
      attempts: 0,
      progress: { stage: 'queued', fraction: 0 },
    })
  })
})
