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
