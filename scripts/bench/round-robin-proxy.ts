/**
 * A small reverse proxy for the web benchmark (`node --import tsx scripts/bench/round-robin-proxy.ts
 * PORT TARGET…`): hands each request to the next target in turn over kept-alive connections, and
 * adds X-Forwarded-For and X-Forwarded-Proto as a real one would. Not for production: no TLS, no
 * health checks, no retries.
 */
import { createServer, request, Agent } from 'node:http'
import { pipeline } from 'node:stream'

const [portArg, ...targets] = process.argv.slice(2)
if (!portArg || !targets.length) {
  console.error('usage: round-robin-proxy.ts PORT http://host:port [http://host:port …]')
  process.exit(2)
}
const agent = new Agent({ keepAlive: true, maxSockets: 256 })
const upstreams = targets.map((t) => new URL(t))
let next = 0
let failures = 0

const server = createServer((req, res) => {
  const target = upstreams[next++ % upstreams.length]
  const headers = {
    ...req.headers,
    'x-forwarded-for': req.socket.remoteAddress ?? '',
    'x-forwarded-proto': 'http',
  }
  const upstream = request(
    { host: target.hostname, port: target.port, method: req.method, path: req.url, headers, agent },
    (answer) => {
      res.writeHead(answer.statusCode ?? 502, answer.headers)
      pipeline(answer, res, () => {})
    },
  )
  upstream.on('error', (err) => {
    if (failures++ < 3) console.error(`proxy: ${target.host} failed: ${err.message}`)
    if (!res.headersSent) res.writeHead(502)
    res.end()
  })
  pipeline(req, upstream, () => {})
})
server.keepAliveTimeout = 65_000
server.listen(Number(portArg), '127.0.0.1', () =>
  console.log(`proxy on 127.0.0.1:${portArg} → ${targets.join(', ')}`),
)
process.once('SIGTERM', () => server.close(() => process.exit(0)))
