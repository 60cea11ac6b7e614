import { existsSync } from 'node:fs'
import { z } from 'zod'

// .env is optional; real environment variables win over it.
if (existsSync('.env')) process.loadEnvFile('.env')

const ConfigSchema = z.object({
  NODE_ENV: z.enum(['development', 'test', 'production']).default('development'),
  HOST: z.string().default('127.0.0.1'),
  PORT: z.coerce.number().int().positive().default(3000),
  PUBLIC_URL: z.string().url().optional(),
  PGHOST: z.string().default('127.0.0.1'),
  PGPORT: z.coerce.number().int().positive().default(54329),
  PGUSER: z.string().default('nestwise'),
  PGPASSWORD: z.string().default('nestwise-local'),
  PGDATABASE: z.string().default('nestwise'),
  SESSION_SECRET: z.string().min(16).default('dev-only-session-secret-change-me'),
  SESSION_MAX_AGE_HOURS: z.coerce.number().positive().default(12),
  LOGIN_RATE_LIMIT: z.coerce.number().int().positive().default(10),
  /**
   * Which reverse proxies to believe about the client's address (X-Forwarded-For) and protocol:
   * "false", a number of hops, or addresses/subnets and the names loopback, linklocal, uniquelocal,
   * comma-separated (Express's "trust proxy"). Unset: loopback when PUBLIC_URL is https, else none.
   */
  TRUST_PROXY: z.string().optional(),
  /**
   * How long an idle kept-alive connection stays open. Longer than the proxy's own idle timeout
   * (60 s on most load balancers), else the server may close a connection the proxy is reusing
   * at that moment and the proxy answers 502.
   */
  KEEP_ALIVE_SECONDS: z.coerce.number().positive().default(65),
  /** Host names answered besides PUBLIC_URL's, HOST and localhost (comma-separated; see docs/deploy.md). */
  ALLOWED_HOSTS: z.string().default(''),
  /** Requests per minute and address on the routes open without an account (share links). */
  SHARED_RATE_LIMIT: z.coerce.number().int().positive().default(120),
  UPLOAD_MAX_MB: z.coerce.number().positive().default(250),
  /**
   * Analyses this process runs at once, each in a worker thread of its own. The web process
   * (server/index.ts) runs one by default, so `npm start` needs no second process; 0 leaves
   * analyses to worker processes (`npm run worker`, server/worker.ts), where it defaults to 1.
   */
  ANALYSIS_WORKERS: z.coerce.number().int().min(0).max(64).optional(),
  /** A run longer than this is stopped and failed (not tried again). */
  ANALYSIS_MAX_RUN_MINUTES: z.coerce
    .number()
    .positive()
    .max(23 * 60)
    .default(15),
  /** A worker process answers liveness and readiness checks on this port (loopback unless WORKER_HEALTH_HOST). */
  WORKER_HEALTH_PORT: z.coerce.number().int().min(0).max(65535).optional(),
  WORKER_HEALTH_HOST: z.string().default('127.0.0.1'),
  SMTP_HOST: z.string().default('127.0.0.1'),
  SMTP_PORT: z.coerce.number().int().positive().default(2525),
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  MAIL_FROM: z.string().default('Nestwise <no-reply@nestwise.invalid>'),
  // fake: a local SMTP server inside the app keeps every message (default outside production).
  MAIL_MODE: z.enum(['fake', 'smtp']).optional(),
})

export type Config = z.infer<typeof ConfigSchema>

function loadConfig(): Config {
  const parsed = ConfigSchema.safeParse(process.env)
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`)
    throw new Error(`Invalid configuration:\n${lines.join('\n')}`)
  }
  if (parsed.data.NODE_ENV === 'production' && parsed.data.SESSION_SECRET.startsWith('dev-only')) {
    throw new Error('SESSION_SECRET must be set in production')
  }
  return parsed.data
}

export const config = loadConfig()

export const publicUrl = config.PUBLIC_URL ?? `http://${config.HOST}:${config.PORT}`

export type TrustProxy = boolean | number | string[]

/** TRUST_PROXY as Express's "trust proxy" setting. */
export function parseTrustProxy(value: string | undefined, https: boolean): TrustProxy {
  if (value === undefined || value.trim() === '') return https ? ['loopback'] : false
  const text = value.trim()
  if (text === 'false') return false
  if (text === 'true') return true
  if (/^\d+$/.test(text)) return Number(text)
  return text
    .split(',')
    .map((part) => part.trim())
    .filter(Boolean)
}

/** Host names the app answers for (requests addressed by IP always pass). */
export const ownHostNames: string[] = [
  new URL(publicUrl).hostname.replace(/^\[|\]$/g, ''),
  config.HOST,
  'localhost',
  ...config.ALLOWED_HOSTS.split(','),
]
  .map((name) => name.trim().toLowerCase())
  .filter(Boolean)
