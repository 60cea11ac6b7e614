import request from 'supertest'
import { afterAll, describe, expect, it } from 'vitest'
import { closeConnections, createTestApp } from '../support/api'

afterAll(closeConnections)

describe('GET /api/health', () => {
  it('reports the app and database as ok', async () => {
    const res = await request(createTestApp()).get('/api/health')
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ data: { status: 'ok', database: 'ok' } })
  })

  it('answers 503 when the database does not answer', async () => {
    const app = createTestApp({
      pingDatabase: () => Promise.reject(new Error('connect ECONNREFUSED 127.0.0.1:54329')),
    })
    const res = await request(app).get('/api/health')
    expect(res.status).toBe(503)
    expect(res.body).toEqual({ data: { status: 'unavailable', database: 'unreachable' } })
    expect(JSON.stringify(res.body)).not.toContain('ECONNREFUSED')
  })

  it('needs no session and sets no cookie', async () => {
    const res = await request(createTestApp()).get('/api/health')
    expect(res.headers['set-cookie']).toBeUndefined()
  })
})

describe('GET /api/health/live and /api/health/ready (for load balancers)', () => {
  it('answers live without asking the database, and ready when the database and the queue answer', async () => {
    const down = () => Promise.reject(new Error('connect ECONNREFUSED 127.0.0.1:54329'))
    const app = createTestApp({ pingDatabase: down, pingQueue: down })
    const live = await request(app).get('/api/health/live').set('Host', 'lb-probe.internal')
    expect(live.status).toBe(200)
    expect(live.body).toEqual({ data: { status: 'ok' } })
    expect(live.headers['cache-control']).toBe('no-store')

    const ready = await request(createTestApp()).get('/api/health/ready')
    expect(ready.status).toBe(200)
    expect(ready.body).toEqual({ data: { status: 'ok', database: 'ok', queue: 'ok' } })
  })

  it('is not ready when the database or the queue does not answer, without saying why', async () => {
    const down = () => Promise.reject(new Error('relation "pgboss.queue" does not exist'))
    const noQueue = await request(createTestApp({ pingQueue: down })).get('/api/health/ready')
    expect(noQueue.status).toBe(503)
    expect(noQueue.body).toEqual({ data: { status: 'unavailable', database: 'ok', queue: 'unreachable' } })
    expect(JSON.stringify(noQueue.body)).not.toContain('pgboss')
    const noDatabase = await request(createTestApp({ pingDatabase: down })).get('/api/health/ready')
    expect(noDatabase.status).toBe(503)
    expect(noDatabase.body.data).toMatchObject({ database: 'unreachable' })
  })
})
