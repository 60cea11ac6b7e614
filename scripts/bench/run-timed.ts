import { spawn } from 'node:child_process'
import { existsSync, readFileSync, rmSync } from 'node:fs'

export interface TimedRun {
  seconds: number
  code: number | null
  stdout: string
  stderr: string
  /** Peak resident memory in kB when the child reported it (see report-usage.mjs), else null. */
  maxRssKb: number | null
  /** CPU time of the child (user + system, all threads) when it reported it, else null. */
  cpuSeconds: number | null
}

/** Runs a command to completion and measures its wall-clock time from spawn to exit. */
export function runTimed(
  command: string,
  args: string[],
  options: { cwd: string; usageFile?: string },
): Promise<TimedRun> {
  if (options.usageFile && existsSync(options.usageFile)) rmSync(options.usageFile)
  return new Promise((resolve, reject) => {
    const started = performance.now()
    const child = spawn(command, args, {
      cwd: options.cwd,
      env: options.usageFile ? { ...process.env, NESTWISE_USAGE_FILE: options.usageFile } : process.env,
      stdio: ['ignore', 'pipe', 'pipe'],
    })
    const out: Buffer[] = []
    const err: Buffer[] = []
    child.stdout.on('data', (chunk: Buffer) => out.push(chunk))
    child.stderr.on('data', (chunk: Buffer) => err.push(chunk))
    child.on('error', reject)
    child.on('close', (code) => {
      const seconds = (performance.now() - started) / 1000
      const usage =
        options.usageFile && existsSync(options.usageFile)
          ? JSON.parse(readFileSync(options.usageFile, 'utf8'))
          : null
      resolve({
        seconds,
        code,
        stdout: Buffer.concat(out).toString('utf8'),
        stderr: Buffer.concat(err).toString('utf8'),
        maxRssKb: usage?.maxRssKb ?? null,
        cpuSeconds: usage?.cpuSeconds ?? null,
      })
    })
  })
}
