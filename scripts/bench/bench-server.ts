/**
 * The part both HTTP benchmarks share: a server of their own on their own port and database,
 * and a demo scientist signed in to it.
 */
import { spawn, type ChildProcess } from 'node:child_process'
import { demoPassword } from '../../seeds/data/demo-accounts'

export const demoScientistEmail = 'sami@example.org'

export interface BenchServer {
  base: string
  process: ChildProcess
  stop: () => void
}

/** Starts `server/index.ts` and stops it again when this process exits. */
export function startBenchServer(options: {
  database: string
  port: number
  env?: Record<string, string>
  /** Drop the server's standard output (its request log: a line per request) instead of printing it. */
  quiet?: boolean
}): BenchServer {
  const base = `http://127.0.0.1:${options.port}`
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    // Own SMTP port too, so a development server running alongside does not clash with this one.
    env: {
      ...process.env,
      PGDATABASE: options.database,
      PORT: String(options.port),
      SMTP_PORT: String(options.port + 1),
      HOST: '127.0.0.1',
      PUBLIC_URL: base,
      NODE_ENV: 'test',
      UPLOAD_MAX_MB: '250',
      ...options.env,
    },
    stdio: ['ignore', options.quiet ? 'ignore' : 'inherit', 'inherit'],
  })
  const stop = () => {
    if (child.exitCode === null) child.kill('SIGTERM')
  }
  process.on('exit', stop)
  return { base, process: child, stop }
}

/** Polls /api/health every 100 ms, `attempts` times at the most. */
export async function waitForHealth(base: string, attempts: number): Promise<void> {
  for (let k = 0; k < attempts; k++) {
    try {
      if ((await fetch(`${base}/api/health`)).ok) return
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 100))
  }
  throw new Error('the server did not come up')
}

export interface BenchSession {
  cookie: string
  /** The demo scientist's first lab. */
  labId: number
  /** What a same-origin request from the client sends, session cookie included. */
  headers: Record<string, string>
}

/** Signs in through the API as Sami, a demo scientist with a lab. */
export async function signInAsDemoScientist(base: string): Promise<BenchSession> {
  const login = await fetch(`${base}/api/v1/auth/login`, {
    method: 'POST',
    headers: { Origin: base, 'X-Requested-With': 'nestwise', 'Content-Type': 'application/json' },
    body: JSON.stringify({ email: demoScientistEmail, password: demoPassword }),
  })
  if (!login.ok) throw new Error(`sign-in failed: ${login.status} ${await login.text()}`)
  const cookie = (login.headers.get('set-cookie') ?? '').split(';')[0]
  const me = ((await login.json()) as { data: { memberships: { labId: number }[] } }).data
  return {
    cookie,
    labId: me.memberships[0].labId,
    headers: { Origin: base, 'X-Requested-With': 'nestwise', Cookie: cookie },
  }
}
