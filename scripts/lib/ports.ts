import { spawnSync } from 'node:child_process'
import { readFileSync } from 'node:fs'

/**
 * Ports on 127.0.0.1, asked synchronously (the set-up scripts run step by step): each check is a
 * short child process, about 50 ms.
 */
const TRY_LISTEN = `
const server = require('node:net').createServer()
server.once('error', () => process.exit(1))
server.listen(Number(process.argv[1]), '127.0.0.1', () => {
  process.stdout.write(String(server.address().port))
  server.close(() => process.exit(0))
})`

/** True when something already listens on `port` at 127.0.0.1. */
export function portTaken(port: number): boolean {
  return spawnSync(process.execPath, ['-e', TRY_LISTEN, String(port)]).status !== 0
}

/** A port nothing listens on at 127.0.0.1 right now (the system picks it). */
export function freePortSync(): number {
  const result = spawnSync(process.execPath, ['-e', TRY_LISTEN, '0'], { encoding: 'utf8' })
  const port = Number(result.stdout)
  if (result.status !== 0 || !Number.isInteger(port) || port <= 0) throw new Error('no free port found')
  return port
}

/**
 * Who listens on `port`, in words, when the system tells (`ss` needs no root for our own
 * processes; as root it sees all): "PostgreSQL of /other/checkout/.data/pg (pid 4242)".
 */
export function portHolder(port: number): string | null {
  const result = spawnSync('ss', ['-ltnpH', `sport = :${port}`], { encoding: 'utf8' })
  if (result.status !== 0) return null
  const match = /users:\(\("([^"]+)",pid=(\d+)/.exec(result.stdout)
  if (!match) return null
  const [, name, pid] = match
  let cmdline: string[] = []
  try {
    cmdline = readFileSync(`/proc/${pid}/cmdline`, 'utf8').split('\0')
  } catch {
    // gone meanwhile, or not ours to read
  }
  const dataDir = cmdline[cmdline.indexOf('-D') + 1]
  if (name.startsWith('postgres') && cmdline.includes('-D') && dataDir)
    return `PostgreSQL of ${dataDir} (pid ${pid})`
  return `${name} (pid ${pid})`
}
