import type { Knex } from 'knex'

/**
 * Analysis runs move to pg-boss (server/queue/analysis-queue.ts), which keeps its jobs in a schema
 * of its own (`pgboss`) that it creates and upgrades at start-up; this migration never touches it.
 * The version row stops being the job: it keeps what people see (status, progress, result) and
 * names its pg-boss job in `job_id`. The lease column goes (a run's liveness is now a PostgreSQL
 * advisory lock held by its process, see analysis-run-locks.repo.ts); `claim_token` stays as the
 * token of the run that may write the outcome, and `attempts` as the number of starts.
 *
 * Versions stored before keep reading as they were: finished ones are untouched (their freeze
 * trigger forbids changes anyway), and queued or running ones have no job yet, so the first
 * process that starts the queue gives each one a job (adoptVersionsWithoutJob).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('analysis_versions', (t) => {
    t.uuid('job_id').nullable()
    t.dropColumn('heartbeat_at')
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('analysis_versions', (t) => {
    t.dropColumn('job_id')
    t.timestamp('heartbeat_at', { useTz: true }).nullable()
  })
  // The hand-written queue takes back running rows whose heartbeat is old; give them one.
  await knex('analysis_versions')
    .where({ status: 'running' })
    .update({ heartbeat_at: knex.raw(`'epoch'`) })
}
