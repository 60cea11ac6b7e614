import { mkdtempSync, rmSync } from 'node:fs'
import { createServer, type Server } from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { localCluster } from './postgres'
import { portTaken } from './ports'

// A cluster in a folder of this test's own: the project's cluster is never touched.
const root = mkdtempSync(join(tmpdir(), 'nestwise-cluster-test-'))
let other: Server | null = null
const cluster = { stop: () => {} }

afterAll(() => {
  cluster.stop()
  other?.close()
  rmSync(root, { recursive: true, force: true })
})

function holdPort(): Promise<number> {
  return new Promise((resolve) => {
    other = createServer().listen(0, '127.0.0.1', () => {
      const address = other!.address()
      resolve(typeof address === 'object' && address ? address.port : 0)
    })
  })
}

describe('the local cluster when its port is taken (another checkout running)', () => {
  it('says what is in the way, or runs on a free port when allowed, and stops what it started', async () => {
    const port = await holdPort()
    const local = localCluster({ dir: join(root, 'pg'), port, user: 'nestwise', password: 'test-only' })
    cluster.stop = local.stop

    expect(() => local.ensure()).toThrow(
      new RegExp(`^Port ${port} on 127\\.0\\.0\\.1 is taken by .+ \\(pid ${process.pid}\\)`),
    )

    const moved = local.ensure({ moveIfTaken: true })
    expect(moved.started).toBe(true)
    expect(moved.port).not.toBe(port)
    expect(portTaken(moved.port)).toBe(true)
    expect(local.ensure()).toEqual({ port: moved.port, started: false })

    local.stop()
    expect(portTaken(moved.port)).toBe(false)
  }, 60_000)
})
