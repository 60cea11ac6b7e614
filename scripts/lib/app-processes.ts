import { spawn, type ChildProcess } from 'node:child_process'
import { freePortSync } from './ports'

/**
 * Nestwise processes as a deployment runs them (web: server/index.ts, worker: server/worker.ts),
 * started as children of a test or a benchmark with the environment they would get there.
 */
export interface AppProcess {
  kind: 'web' | 'worker'
  name: string
  child: ChildProcess
  /** The web process's own address, or the worker's health-check address. */
  base: string
  /** Its output so far (shown when something fails). */
  output: () => string
}

function launch(
  kind: AppProcess['kind'],
  name: string,
  entry: string,
  env: Record<string, string>,
  base: string,
) {
  const child = spawn(process.execPath, ['--import', 'tsx', entry], {
    env: { ...process.env, ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  let output = ''
  const keep = (chunk: Buffer) => {
    output = (output + chunk.toString()).slice(-20_000)
  }
  child.stdout!.on('data', keep)
  child.stderr!.on('data', keep)
  return { kind, name, child, base, output: () => output }
}

/** A web process on a free port of 127.0.0.1 (its own fake SMTP port too). */
export function startWeb(name: string, env: Record<string, string>): AppProcess {
  const port = freePortSync()
  return launch(
    'web',
    name,
    'server/index.ts',
    { HOST: '127.0.0.1', PORT: String(port), SMTP_PORT: String(freePortSync()), ...env },
    `http://127.0.0.1:${port}`,
  )
}

/** A worker process, answering health checks on a free port of 127.0.0.1. */
export function startWorker(name: string, env: Record<string, string>): AppProcess {
  const port = freePortSync()
  return launch(
    'worker',
    name,
    'server/worker.ts',
    { WORKER_HEALTH_PORT: String(port), ...env },
    `http://127.0.0.1:${port}`,
  )
}

const readyPath = (p: AppProcess) => (p.kind === 'web' ? '/api/health/ready' : '/health/ready')

/** Waits until the process answers its readiness check with 200. */
export async function waitReady(p: AppProcess, timeoutMs = 60_000): Promise<void> {
  const deadline = Date.now() + timeoutMs
  while (Date.now() < deadline) {
    if (p.child.exitCode !== null) throw new Error(`${p.name} exited (${p.child.exitCode}):\n${p.output()}`)
    try {
      if ((await fetch(`${p.base}${readyPath(p)}`)).ok) return
    } catch {
      // not listening yet
    }
    await new Promise((resolve) => setTimeout(resolve, 100))
  }
  throw new Error(`${p.name} was not ready within ${timeoutMs} ms:\n${p.output()}`)
}

/** Stops a process with SIGTERM (SIGKILL after `graceMs`) and waits for it to exit. */
export async function stopProcess(p: AppProcess, graceMs = 15_000): Promise<void> {
  if (p.child.exitCode !== null || p.child.signalCode !== null) return
  const exited = new Promise((resolve) => p.child.once('exit', resolve))
  p.child.kill('SIGTERM')
  const timer = setTimeout(() => p.child.kill('SIGKILL'), graceMs)
  await exited
  clearTimeout(timer)
}
