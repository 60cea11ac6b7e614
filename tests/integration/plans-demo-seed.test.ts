import { afterAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { seed as seedPeople } from '../../seeds/01-demo-people'
import { seed as seedDatasets } from '../../seeds/02-demo-datasets'
import { seed as seedAnalyses } from '../../seeds/03-demo-analyses'
import { seed as seedPlans } from '../../seeds/04-demo-plans'
import { computePlan } from '../../shared/planning/compute-plan'
import { PlanInputs } from '../../shared/schemas/plans'
import { closeConnections } from '../support/api'

afterAll(closeConnections)

describe('demo plan seed', () => {
  it('saves one plan from the single-lab demo analysis, once, with the engine’s answer to its inputs', async () => {
    await seedPeople(db)
    await seedDatasets(db)
    await seedAnalyses(db)
    await seedPlans(db)
    await seedPlans(db)
    const rows = await db('plans as p')
      .join('analysis_versions as v', 'v.id', 'p.analysis_version_id')
      .join('analyses as a', 'a.id', 'v.analysis_id')
      .join('labs as l', 'l.id', 'a.lab_id')
      .where({ 'l.slug': 'nimbus-neurite-lab', 'a.name': 'Neurite length, NW-117 vs vehicle' })
      .where('p.name', 'like', 'Follow-up outgrowth run%')
      .select(
        'p.inputs',
        'p.result',
        'p.project_id',
        'a.project_id as analysis_project',
        'v.version_no',
        'v.result as analysis',
      )
    expect(rows).toHaveLength(1)
    const [plan] = rows
    expect(plan.version_no).toBe(1)
    expect(plan.project_id).toBe(plan.analysis_project)
    const inputs = PlanInputs.parse(plan.inputs)
    expect({ ...plan.result, engineVersion: '' }).toEqual({ ...computePlan(inputs), engineVersion: '' })
    // The inputs start from the analysis: its ICC of the mice, rounded to three significant digits.
    const icc = plan.analysis.icc.find((e: { level: string }) => e.level === 'mouse').icc
    expect(Math.abs(inputs.icc - icc)).toBeLessThan(0.001)
    expect(inputs.spread.kind).toBe('components')
  })
})
