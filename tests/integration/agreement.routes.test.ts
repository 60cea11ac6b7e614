import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { AgreementResult } from '../../shared/schemas/agreement'
import { db } from '../../server/db'
import { startAnalysisRunner, stopAnalysisRunner } from '../../server/jobs/analysis-runner'
import { seed as seedPeople } from '../../seeds/01-demo-people'
import { seed as seedDatasets } from '../../seeds/02-demo-datasets'
import { seed as seedAnalyses } from '../../seeds/03-demo-analyses'
import { demoPassword } from '../../seeds/data/demo-accounts'
import { closeConnections, createTestApp, signIn } from '../support/api'
import { neuriteCsv, pollUntilFinished, taggedDataset } from './analyses-support'
import { getAs, postAs, signedInTeam } from './datasets-support'

const app = createTestApp()

beforeAll(() => {
  startAnalysisRunner({ pollMs: 100, reapEveryMs: 500 })
})

afterAll(async () => {
  await stopAnalysisRunner()
  await closeConnections()
})

async function finishedAnalysis(cookie: string, labId: number, csv: string, levels: string[]) {
  const dataset = await taggedDataset(app, cookie, labId, csv, levels)
  const res = await postAs(app, cookie, '/api/v1/analyses', { datasetId: dataset.id })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  const { final } = await pollUntilFinished(app, cookie, res.body.data.id, 1)
  expect(final.status).toBe('done')
  return res.body.data.id as number
}

describe('agreement between labs on the demo consortium', () => {
  it('flags the lab whose spread was made larger', async () => {
    await seedPeople(db)
    await seedDatasets(db)
    await seedAnalyses(db)
    const { id } = await db('analyses').where({ name: 'Neurite length across three labs' }).first('id')
    const petra = await signIn(app, 'petra@example.org', demoPassword)
    const res = await getAs(app, petra, `/api/v1/analyses/${id}/versions/1/agreement`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const data = res.body.data as AgreementResult
    expect(data.labs.map((l) => [l.label, l.nUnits])).toEqual([
      ['Nimbus', 6],
      ['Fernhill', 6],
      ['Larkspur', 6],
    ])
    // Invented demo data, flag expected by construction (seeds/data/demo-datasets.ts): Larkspur's
    // neurons vary with SD 45 µm inside a mouse, the other labs' with 21–22 µm.
    const cochran = data.tests.find((t) => t.name === 'Cochran (observations inside units)')!
    expect(cochran).toMatchObject({ lab: 'Larkspur', flag: 'outlier' })
    expect(cochran.sentence).toContain("Larkspur's spread")
    expect(data.labs.find((l) => l.label === 'Larkspur')!.kWithinFlag).toBe('outlier')
    expect(data.labs.filter((l) => l.label !== 'Larkspur').map((l) => l.kWithinFlag)).toEqual(['ok', 'ok'])
    expect(data.findings[0]).toMatch(/^Larkspur's spread .* unusually large/)
    // ISO 5725-2 relations (r = 2.8 s_r, R = 2.8 s_R, s_R² = s_L² + s_r²).
    const p = data.precision
    expect(p.r).toBeCloseTo(2.8 * p.sr, 12)
    expect(p.R).toBeCloseTo(2.8 * p.sR, 12)
    expect(p.sR ** 2).toBeCloseTo(p.sL ** 2 + p.sr ** 2, 9)
    // Every lab runs both arms; the compound's effect is the same in every lab by construction, so
    // the interaction test has no reason to reject (a check of direction, not of power).
    expect(data.effect!.perLab).toHaveLength(3)
    expect(data.effect!.interaction!.df1).toBe(2)
    expect(data.effect!.interaction!.df2).toBe(18 - 6)
  })
})

describe('who may open it and for which designs', () => {
  let team: Awaited<ReturnType<typeof signedInTeam>>
  let outsider: Awaited<ReturnType<typeof signedInTeam>>
  let threeLabs: number

  beforeAll(async () => {
    ;[team, outsider] = await Promise.all([signedInTeam(app), signedInTeam(app)])
    threeLabs = await finishedAnalysis(
      team.cookies.scientist,
      team.lab.id,
      neuriteCsv({
        seed: 'agreement-labs',
        labs: ['North', 'South', 'East', 'West'],
        mice: 6,
        minCells: 10,
        maxCells: 20,
      }),
      ['lab', 'mouse'],
    )
  })

  it('answers every member of the lab, 404 elsewhere', async () => {
    for (const cookie of Object.values(team.cookies)) {
      expect((await getAs(app, cookie, `/api/v1/analyses/${threeLabs}/versions/1/agreement`)).status).toBe(
        200,
      )
    }
    expect(
      (await getAs(app, outsider.cookies.pi, `/api/v1/analyses/${threeLabs}/versions/1/agreement`)).status,
    ).toBe(404)
    expect(
      (await getAs(app, team.cookies.pi, `/api/v1/analyses/${threeLabs}/versions/9/agreement`)).status,
    ).toBe(404)
  })

  it('matches hand-computed per-lab unit means and t intervals', async () => {
    const res = await getAs(app, team.cookies.pi, `/api/v1/analyses/${threeLabs}/versions/1/agreement`)
    const data = res.body.data as AgreementResult
    expect(data.labs).toHaveLength(4)
    expect(data.mandel.h.fivePercent).toBeGreaterThan(0)
    // Recompute North's vehicle mean from the same invented table (common practice: mean of mouse means).
    const rows = neuriteCsv({
      seed: 'agreement-labs',
      labs: ['North', 'South', 'East', 'West'],
      mice: 6,
      minCells: 10,
      maxCells: 20,
    })
      .trim()
      .split('\n')
      .slice(1)
      .map((l) => l.split(','))
      .filter((r) => r[0] === 'North' && r[2] === 'vehicle')
    const byMouse = new Map<string, number[]>()
    for (const r of rows) byMouse.set(r[1], [...(byMouse.get(r[1]) ?? []), Number(r[4])])
    const means = [...byMouse.values()].map((v) => v.reduce((a, b) => a + b, 0) / v.length)
    const north = data.labs
      .find((l) => l.label === 'North')!
      .byCondition.find((g) => g.condition === 'vehicle')!
    expect(north.nUnits).toBe(3)
    expect(north.mean).toBeCloseTo(means.reduce((a, b) => a + b, 0) / 3, 9)
    // t_{0.975, 2} = 4.302653 (standard t table).
    const sd = Math.sqrt(means.reduce((s, m) => s + (m - north.mean) ** 2, 0) / 2)
    expect(north.ciHigh! - north.mean).toBeCloseTo((4.302653 * sd) / Math.sqrt(3), 4)
  })

  it('is 422 for an analysis with fewer than 3 outer units', async () => {
    const oneLab = await finishedAnalysis(
      team.cookies.scientist,
      team.lab.id,
      neuriteCsv({ seed: 'agreement-one' }),
      ['mouse'],
    )
    const res = await getAs(app, team.cookies.pi, `/api/v1/analyses/${oneLab}/versions/1/agreement`)
    // One level only (mouse): there is no level inside the outermost one.
    expect(res.status).toBe(422)
    const twoLabs = await finishedAnalysis(
      team.cookies.scientist,
      team.lab.id,
      neuriteCsv({ seed: 'agreement-two', labs: ['A', 'B'], mice: 6 }),
      ['lab', 'mouse'],
    )
    const two = await getAs(app, team.cookies.pi, `/api/v1/analyses/${twoLabs}/versions/1/agreement`)
    expect(two.status).toBe(422)
    expect(two.body.error.message).toMatch(/at least 3 labs/)
  })
})
