import { createServer, type Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { logger } from '../logger'
import { checkReadiness, type ReadinessProbes } from './readiness'

export interface RunningHealthServer {
  port: number
  close(): Promise<void>
}

/**
 * The health checks of a process without the web app (a worker): GET /health/live and
 * GET /health/ready, answered as the web process answers /api/health/live and /api/health/ready.
 */
export async function startHealthServer(options: {
  host: string
  port: number
  probes: ReadinessProbes
}): Promise<RunningHealthServer> {
  const server: Server = createServer((req, res) => {
    const send = (status: number, data: object) => {
      res.writeHead(status, { 'Content-Type': 'application/json', 'Cache-Control': 'no-store' })
      res.end(JSON.stringify({ data }))
    }
    const path = (req.url ?? '').split('?')[0]
    if (req.method !== 'GET') return send(405, { status: 'method not allowed' })
    if (path === '/health/live') return send(200, { status: 'ok' })
    if (path !== '/health/ready') return send(404, { status: 'not found' })
    void checkReadiness(options.probes).then(({ ready, checks, errors }) => {
      if (!ready) logger.warn('readiness check failed', { checks, err: Object.values(errors)[0] })
      send(ready ? 200 : 503, { status: ready ? 'ok' : 'unavailable', ...checks })
    })
  })
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject)
    server.listen(options.port, options.host, () => {
      server.off('error', reject)
      resolve()
    })
  })
  return {
    port: (server.address() as AddressInfo).port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  }
}
