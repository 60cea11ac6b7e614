import { config } from './config'

type Level = 'debug' | 'info' | 'warn' | 'error'
const rank: Record<Level, number> = { debug: 10, info: 20, warn: 30, error: 40 }

// Tests keep the console for their own output; only real faults are printed there.
const minimum: Level = config.NODE_ENV === 'test' ? 'error' : 'info'

export type LogFields = Record<string, unknown>

function formatValue(value: unknown): string {
  if (typeof value === 'string') return /\s/.test(value) ? JSON.stringify(value) : value
  if (value instanceof Date) return value.toISOString()
  return JSON.stringify(value)
}

function write(level: Level, message: string, fields: LogFields = {}): void {
  if (rank[level] < rank[minimum]) return
  const { err, ...rest } = fields
  const pairs = Object.entries(rest)
    .filter(([, v]) => v !== undefined)
    .map(([k, v]) => `${k}=${formatValue(v)}`)
  const line = [new Date().toISOString(), level.toUpperCase().padEnd(5), message, ...pairs].join(' ')
  const stream = rank[level] >= rank.warn ? process.stderr : process.stdout
  stream.write(`${line}\n`)
  // Stacks go to the log only, never into a response.
  if (err instanceof Error) stream.write(`${err.stack ?? `${err.name}: ${err.message}`}\n`)
  else if (err !== undefined) stream.write(`${formatValue(err)}\n`)
}

/** One-line, key=value logging; errors passed as `err` get their stack printed underneath. */
export const logger = {
  debug: (message: string, fields?: LogFields) => write('debug', message, fields),
  info: (message: string, fields?: LogFields) => write('info', message, fields),
  warn: (message: string, fields?: LogFields) => write('warn', message, fields),
  error: (message: string, fields?: LogFields) => write('error', message, fields),
}
