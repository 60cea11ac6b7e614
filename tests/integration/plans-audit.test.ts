import { afterAll, beforeAll, expect, it } from 'vitest'
import { db } from '../../server/db'
import { closeConnections, createTestApp } from '../support/api'
import { deleteAs, patchAs, postAs, signedInTeam } from './datasets-support'

const app = createTestApp()
let team: Awaited<ReturnType<typeof signedInTeam>>

beforeAll(async () => {
  team = await signedInTeam(app)
})
afterAll(closeConnections)

async function entriesFor(planId: number) {
  return db('audit_events')
    .where({ subject_type: 'plan', subject_id: String(planId) })
    .orderBy('id')
    .select('action', 'actor_user_id', 'lab_id', 'details', 'request_id')
}

it('records saving, renaming, moving and deleting a plan in the lab’s audit log, refused writes not', async () => {
  const project = await postAs(app, team.cookies.pi, '/api/v1/projects', {
    labId: team.lab.id,
    name: 'Planned runs',
  })
  expect(project.status, JSON.stringify(project.body)).toBe(201)
  const created = await postAs(app, team.cookies.scientist, '/api/v1/plans', {
    labId: team.lab.id,
    name: 'Audited plan',
    inputs: {
      icc: 0.2,
      spread: { kind: 'total', sdTotal: 25 },
      difference: 10,
      costPerUnit: 300,
      costPerObs: 2,
    },
  })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  const planId = created.body.data.id as number

  const refused = await patchAs(app, team.cookies.biostatistician, `/api/v1/plans/${planId}`, { name: 'x' })
  expect(refused.status).toBe(403)
  const renamed = await patchAs(app, team.cookies.pi, `/api/v1/plans/${planId}`, {
    name: 'Audited plan, renamed',
    projectId: project.body.data.id,
  })
  expect(renamed.status).toBe(200)
  const removed = await deleteAs(app, team.cookies.scientist, `/api/v1/plans/${planId}`)
  expect(removed.status).toBe(204)

  const entries = await entriesFor(planId)
  expect(entries.map((e) => [e.action, e.actor_user_id, e.lab_id])).toEqual([
    ['plan.created', team.scientist.id, team.lab.id],
    ['plan.updated', team.pi.id, team.lab.id],
    ['plan.deleted', team.scientist.id, team.lab.id],
  ])
  expect(entries[0].request_id).toBe(created.headers['x-request-id'])
  expect(entries[0].details).toMatchObject({
    name: 'Audited plan',
    projectId: null,
    unitsPerArm: created.body.data.result.unitsPerArm,
  })
  expect(entries[1].details).toEqual({
    name: { from: 'Audited plan', to: 'Audited plan, renamed' },
    projectId: { from: null, to: project.body.data.id },
  })
  expect(entries[2].details).toEqual({ name: 'Audited plan, renamed' })
  expect(await db('plans').where({ id: planId }).first()).toBeUndefined()
})
