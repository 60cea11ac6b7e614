import type { ChildProcess } from 'node:child_process'

/**
 * Keeps a server process running: when it exits on its own it is started again after a pause that
 * doubles with each quick failure (1 s, 2 s, 4 s … up to `maxDelayMs`) and starts over once a run
 * has lasted `stableMs`. Only stop() ends it: the server gets SIGTERM (and SIGKILL after
 * `killAfterMs`), then stop() resolves.
 */
export interface SuperviseOptions {
  /** Starts one run of the server. */
  start: () => ChildProcess
  /** Told of each unexpected exit and the pause before the next start. */
  onExit?: (exit: { code: number | null; signal: NodeJS.Signals | null; restartInMs: number }) => void
  firstDelayMs?: number
  maxDelayMs?: number
  stableMs?: number
  killAfterMs?: number
}

export interface Supervisor {
  /** Starts of the server so far (the first one included). */
  readonly starts: number
  stop(): Promise<void>
}

export function supervise(options: SuperviseOptions): Supervisor {
  const firstDelay = options.firstDelayMs ?? 1000
  const maxDelay = options.maxDelayMs ?? 30_000
  const stable = options.stableMs ?? 60_000
  const killAfter = options.killAfterMs ?? 15_000
  let delay = firstDelay
  let stopping = false
  let starts = 0
  let child: ChildProcess | null = null
  let timer: NodeJS.Timeout | null = null

  const launch = () => {
    timer = null
    if (stopping) return
    const startedAt = Date.now()
    starts++
    const current = options.start()
    child = current
    current.once('exit', (code, signal) => {
      child = null
      if (stopping) return
      if (Date.now() - startedAt >= stable) delay = firstDelay
      const restartInMs = delay
      delay = Math.min(delay * 2, maxDelay)
      options.onExit?.({ code, signal, restartInMs })
      timer = setTimeout(launch, restartInMs)
    })
  }
  launch()

  return {
    get starts() {
      return starts
    },
    async stop() {
      stopping = true
      if (timer) clearTimeout(timer)
      const running = child
      if (!running || running.exitCode !== null || running.signalCode !== null) return
      await new Promise<void>((resolve) => {
        const force = setTimeout(() => running.kill('SIGKILL'), killAfter)
        running.once('exit', () => {
          clearTimeout(force)
          resolve()
        })
        running.kill('SIGTERM')
      })
    },
  }
}
