import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { computePlan } from '../../shared/planning/compute-plan'
import { PlanInputs, type PlanInputsInput } from '../../shared/schemas/plans'
import { fakeFetch } from '@/testing/fake-fetch'
import { usePlansStore } from './plans'

const ok = (data: unknown, status = 200) => ({ status, body: { data } })

const inputs: PlanInputsInput = {
  icc: 20 / 120,
  spread: { kind: 'total', sdTotal: Math.sqrt(120) },
  difference: 8,
  costPerUnit: 100,
  costPerObs: 1,
  outer: { name: 'lab', minLabs: 2, maxLabs: 6, costPerLab: 2000, effectSd: 2 },
}
const result = computePlan(PlanInputs.parse(inputs))

beforeEach(() => setActivePinia(createPinia()))
afterEach(() => {
  vi.unstubAllGlobals()
  vi.useRealTimers()
})

describe('usePlansStore', () => {
  it('asks the server once for a burst of changes, with the last numbers', async () => {
    const fake = fakeFetch({ 'POST /api/v1/plans/preview': ok(result) })
    vi.stubGlobal('fetch', fake.fetch)
    const store = usePlansStore()
    void store.preview({ ...inputs, difference: 5 }, 5)
    void store.preview({ ...inputs, difference: 6 }, 5)
    await store.preview(inputs, 5)
    expect(fake.calls).toHaveLength(1)
    expect(JSON.parse(String(fake.calls[0].init.body))).toEqual({ inputs })
    expect(store.result?.labs).toBe(result.labs)
    expect(store.previewError).toBeNull()
    expect(store.computing).toBe(false)
  })

  it('keeps the server’s refusal of impossible numbers', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'POST /api/v1/plans/preview': {
          status: 422,
          body: {
            error: {
              code: 'UNPROCESSABLE',
              message: 'with each lab running one arm, at least 2 labs per arm are needed',
            },
          },
        },
      }).fetch,
    )
    const store = usePlansStore()
    await store.preview(inputs, 0)
    expect(store.previewError?.status).toBe(422)
    expect(store.previewError?.message).toMatch(/at least 2 labs per arm/)
  })

  it('saves a plan from an analysis with its source, then lists the plans again', async () => {
    const defaults = {
      source: { analysisId: 7, versionNo: 2, analysisName: 'Consortium' },
      labId: 3,
      projectId: 4,
      unitLevel: 'mouse',
      responseName: 'length',
      inputs: PlanInputs.parse(inputs),
      unitsInData: 5,
      meanObsPerUnit: 40,
      outerLevel: 'lab',
      labsInData: 4,
      labArmVarianceSource: 'analysis',
      mapping: [],
    }
    const plan = { id: 11, name: 'Next', labId: 3, inputs: PlanInputs.parse(inputs), result }
    const fake = fakeFetch({
      'GET /api/v1/plans/defaults?analysisId=7&versionNo=2': ok(defaults),
      'POST /api/v1/plans': ok(plan, 201),
      'GET /api/v1/plans': ok([plan]),
    })
    vi.stubGlobal('fetch', fake.fetch)
    const store = usePlansStore()
    expect((await store.startFromAnalysis(7, 2))?.labsInData).toBe(4)
    const saved = await store.save({ labId: 3, projectId: 4, name: 'Next', inputs })
    expect(saved?.id).toBe(11)
    const body = JSON.parse(String(fake.calls.find((c) => c.init.method === 'POST')!.init.body))
    expect(body).toMatchObject({
      labId: 3,
      projectId: 4,
      name: 'Next',
      source: { analysisId: 7, versionNo: 2 },
    })
    expect(store.list.map((p) => p.id)).toEqual([11])
  })
})
