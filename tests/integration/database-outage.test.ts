import request from 'supertest'
import { register } from 'tsx/esm/api'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startThrowawayCluster, type ThrowawayCluster } from '../support/throwaway-cluster'

// The app runs against a cluster of this test's own, which it stops and starts again; the shared
// cluster other runs use is never touched. The configuration is read when the app loads, so the
// cluster is started first and the app imported after.
const login = { user: process.env.PGUSER ?? 'nestwise', password: process.env.PGPASSWORD ?? 'nestwise-local' }
const cluster: ThrowawayCluster = await startThrowawayCluster(login)
const saved = { PGPORT: process.env.PGPORT, PGDATABASE: process.env.PGDATABASE }
process.env.PGPORT = String(cluster.port)
process.env.PGDATABASE = 'nestwise_outage'
const { prepareDatabase } = await import('../../scripts/lib/database')
const { closeConnections, createTestApp, signIn } = await import('../support/api')
const { createLabWithTeam } = await import('../support/factories')
for (const [name, value] of Object.entries(saved)) {
  if (value === undefined) delete process.env[name]
  else process.env[name] = value
}

const app = createTestApp()
let cookie = ''

beforeAll(async () => {
  // knex imports the TypeScript migrations with Node's own import(), which vitest's runner does not cover.
  const unregister = register()
  try {
    await prepareDatabase('nestwise_outage', { fresh: true })
  } finally {
    await unregister()
  }
  const team = await createLabWithTeam()
  cookie = await signIn(app, team.scientist.email, team.scientist.password)
}, 120_000)

afterAll(async () => {
  await closeConnections()
  cluster.destroy()
})

const signedIn = (path: string) => request(app).get(path).set('Cookie', cookie)

describe('while PostgreSQL is down', () => {
  it('answers signed-in requests 503 with Retry-After and a plain message, and recovers on the first request after it is back', async () => {
    expect((await signedIn('/api/v1/auth/me')).status).toBe(200)
    expect((await signedIn('/api/v1/analyses')).status).toBe(200)

    cluster.stop()
    for (const path of ['/api/v1/auth/me', '/api/v1/analyses', '/api/v1/datasets']) {
      const res = await signedIn(path)
      expect(res.status, path).toBe(503)
      expect(res.headers['retry-after'], path).toBe('5')
      expect(res.body.error).toMatchObject({
        code: 'SERVICE_UNAVAILABLE',
        message: 'Nestwise cannot reach its database just now. Try again in a few seconds.',
      })
    }
    expect((await request(app).get('/api/health')).status).toBe(503)

    cluster.start()
    const back = performance.now()
    const first = await signedIn('/api/v1/analyses')
    const recovered = performance.now() - back
    expect(first.status, JSON.stringify(first.body)).toBe(200)
    expect((await signedIn('/api/v1/auth/me')).body.data.email).toMatch(/@example\.test$/)
    console.info(`first request after the database came back answered 200 in ${recovered.toFixed(0)} ms`)
  }, 120_000)
})
