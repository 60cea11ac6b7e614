/**
 * Liveness and readiness, as a load balancer or an orchestrator asks for them:
 * - live: the process is up and its event loop answers (nothing else is checked, so a database
 *   outage never gets healthy processes restarted);
 * - ready: what the process needs to do its work answers: the database, and the analysis queue
 *   (pg-boss, in the same database) where versions are queued or taken from.
 * Failures are reported as "unreachable" only; the reason goes to the log.
 */
export type Probe = () => Promise<unknown>

export interface ReadinessProbes {
  database: Probe
  /** Absent when the process neither queues nor runs analyses. */
  queue?: Probe
}

export interface Readiness {
  ready: boolean
  checks: Record<string, 'ok' | 'unreachable'>
  /** Why each failing check failed, for the log only. */
  errors: Record<string, unknown>
}

const PROBE_TIMEOUT_MS = 3000

function withinTimeout(probe: Probe): Promise<unknown> {
  let timer: NodeJS.Timeout | undefined
  const timeout = new Promise((_, reject) => {
    timer = setTimeout(() => reject(new Error(`no answer within ${PROBE_TIMEOUT_MS} ms`)), PROBE_TIMEOUT_MS)
  })
  return Promise.race([probe(), timeout]).finally(() => clearTimeout(timer))
}

export async function checkReadiness(probes: ReadinessProbes): Promise<Readiness> {
  const entries = Object.entries(probes).filter((entry): entry is [string, Probe] => !!entry[1])
  const settled = await Promise.allSettled(entries.map(([, probe]) => withinTimeout(probe)))
  const checks: Readiness['checks'] = {}
  const errors: Readiness['errors'] = {}
  settled.forEach((outcome, i) => {
    const name = entries[i][0]
    checks[name] = outcome.status === 'fulfilled' ? 'ok' : 'unreachable'
    if (outcome.status === 'rejected') errors[name] = outcome.reason
  })
  return { ready: Object.values(checks).every((c) => c === 'ok'), checks, errors }
}
