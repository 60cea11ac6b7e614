import { afterEach, describe, expect, it, vi } from 'vitest'
import { checkReadiness } from './readiness'

afterEach(() => {
  vi.useRealTimers()
})

describe('checkReadiness', () => {
  it('is ready when every probe answers, and names each check', async () => {
    const result = await checkReadiness({ database: async () => 1, queue: async () => 0 })
    expect(result).toEqual({ ready: true, checks: { database: 'ok', queue: 'ok' }, errors: {} })
  })

  it('is not ready when one probe fails, keeping the reason for the log only', async () => {
    const reason = new Error('relation "pgboss.queue" does not exist')
    const result = await checkReadiness({ database: async () => 1, queue: () => Promise.reject(reason) })
    expect(result.ready).toBe(false)
    expect(result.checks).toEqual({ database: 'ok', queue: 'unreachable' })
    expect(result.errors.queue).toBe(reason)
  })

  it('leaves out a probe the process does not have', async () => {
    const result = await checkReadiness({ database: async () => 1, queue: undefined })
    expect(result.checks).toEqual({ database: 'ok' })
  })

  it('counts a probe that hangs as unreachable after three seconds', async () => {
    vi.useFakeTimers()
    const pending = checkReadiness({ database: () => new Promise(() => {}) })
    await vi.advanceTimersByTimeAsync(3001)
    const result = await pending
    expect(result.checks.database).toBe('unreachable')
    expect(String(result.errors.database)).toMatch(/3000 ms/)
  })
})
