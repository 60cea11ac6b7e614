// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { computePlan } from '../../shared/planning/compute-plan'
import { PlanInputs, type Plan, type PlanResult } from '../../shared/schemas/plans'
import { fakeFetch } from '@/testing/fake-fetch'
import { mountWithApp } from '@/testing/mount-with-app'
import { samiScientist } from '@/testing/users'
import PlannerView from './PlannerView.vue'

// Invented numbers for one lab: the answer is whatever the planner computes for them.
const inputs = PlanInputs.parse({
  icc: 0.2,
  spread: { kind: 'total', sdTotal: 25 },
  difference: 20,
  costPerUnit: 100,
  costPerObs: 1,
})
const result = computePlan(inputs)
const plan: Plan = {
  id: 7,
  labId: 1,
  labName: 'Nimbus Neurite Lab',
  project: null,
  source: null,
  name: 'Pilot follow-up',
  inputs,
  result,
  createdBy: { id: samiScientist.id, name: samiScientist.name },
  createdAt: '2025-01-01T00:00:00.000Z',
  updatedAt: '2025-01-01T00:00:00.000Z',
  permissions: { write: true },
}

const ok = (data: unknown) => ({ status: 200, body: { data } })

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

/** The server as the planner sees it, with the plan computation held until the test answers it. */
function serverHoldingThePreview() {
  const rest = fakeFetch({
    'GET /api/v1/auth/session': ok(samiScientist),
    'GET /api/v1/plans/7': ok(plan),
    'GET /api/v1/plans': ok([]),
    'GET /api/v1/projects': ok([]),
  }).fetch
  const answers: ((value: PlanResult) => void)[] = []
  let asked = 0
  vi.stubGlobal('fetch', (input: RequestInfo | URL, init: RequestInit = {}) => {
    if (String(input) !== '/api/v1/plans/preview' || init.method !== 'POST') return rest(input, init)
    asked += 1
    return new Promise<Response>((resolve) => {
      answers.push((value) =>
        resolve(
          new Response(JSON.stringify({ data: value }), {
            status: 200,
            headers: { 'Content-Type': 'application/json' },
          }),
        ),
      )
    })
  })
  return {
    asked: () => asked,
    answer: (value: PlanResult) => answers.splice(0).forEach((send) => send(value)),
  }
}

describe('PlannerView', () => {
  it('shows progress in the results half while the first plan is computed, then the plan in its place', async () => {
    vi.useFakeTimers({ toFake: ['setTimeout', 'clearTimeout'] })
    try {
      const server = serverHoldingThePreview()
      const { wrapper } = await mountWithApp(PlannerView, {
        path: '/plans/7',
        stubs: { PlanningChart: true },
      })
      // The plan is open and its computation asked for at once, without the pause after typing.
      await vi.advanceTimersByTimeAsync(0)
      expect(server.asked()).toBe(1)
      // Not answered yet: the results half is not blank.
      await vi.runAllTimersAsync()
      await flushPromises()
      expect(server.asked()).toBe(1)
      const progress = wrapper.get('[data-testid="plan-progress"]')
      expect(progress.attributes('role')).toBe('progressbar')
      expect(progress.attributes('aria-label')).toBe('Working out the plan')
      expect(wrapper.find('[data-testid="plan-skeleton"]').exists()).toBe(true)
      expect(wrapper.find('[data-testid="plan-units"]').exists()).toBe(false)

      server.answer(result)
      await flushPromises()
      expect(wrapper.find('[data-testid="plan-progress"]').exists()).toBe(false)
      expect(wrapper.find('[data-testid="plan-skeleton"]').exists()).toBe(false)
      expect(wrapper.get('[data-testid="plan-units"]').text()).toBe(String(result.unitsPerArm))
    } finally {
      vi.useRealTimers()
    }
  })
})
