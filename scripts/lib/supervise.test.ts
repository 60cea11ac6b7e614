import { spawn } from 'node:child_process'
import { describe, expect, it } from 'vitest'
import { supervise } from './supervise'

const node = (code: string) => spawn(process.execPath, ['-e', code], { stdio: 'ignore' })
const wait = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms))

describe('supervise', () => {
  it('starts a server that died again, with pauses that double, and not after stop()', async () => {
    const pauses: number[] = []
    const supervisor = supervise({
      start: () => node('process.exit(3)'),
      onExit: ({ code, restartInMs }) => {
        expect(code).toBe(3)
        pauses.push(restartInMs)
      },
      firstDelayMs: 20,
      maxDelayMs: 80,
    })
    while (pauses.length < 4) await wait(20)
    await supervisor.stop()
    const starts = supervisor.starts
    expect(pauses.slice(0, 4)).toEqual([20, 40, 80, 80])
    await wait(250)
    expect(supervisor.starts).toBe(starts)
  })

  it('stops a running server with SIGTERM and waits for it to exit', async () => {
    let child: ReturnType<typeof node> | null = null
    const supervisor = supervise({
      start: () =>
        (child = node(
          'process.on("SIGTERM", () => setTimeout(() => process.exit(0), 50)); setInterval(() => {}, 1000)',
        )),
      onExit: () => {
        throw new Error('a stop is not an unexpected exit')
      },
    })
    await wait(200)
    await supervisor.stop()
    expect(child!.exitCode).toBe(0)
    expect(supervisor.starts).toBe(1)
  })

  it('goes back to the first pause once a run has lasted long enough', async () => {
    const pauses: number[] = []
    let run = 0
    const supervisor = supervise({
      // Runs 1–2 fail at once, run 3 lasts 1.5 s, run 4 fails at once.
      start: () => node(++run === 3 ? 'setTimeout(() => process.exit(1), 1500)' : 'process.exit(1)'),
      onExit: ({ restartInMs }) => pauses.push(restartInMs),
      firstDelayMs: 10,
      stableMs: 1000,
    })
    while (pauses.length < 4) await wait(20)
    await supervisor.stop()
    expect(pauses.slice(0, 4)).toEqual([10, 20, 10, 20])
  })
})
