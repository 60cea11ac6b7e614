import type { Knex } from 'knex'

/**
 * Analyses of a dataset and their immutable versions. A version row doubles as the job of
 * computing it: the job runners of every server process claim queued rows with
 * `FOR UPDATE SKIP LOCKED`, keep a heartbeat while running, and a row whose heartbeat is older
 * than the lease goes back to the queue (or fails after too many attempts), so a crash never
 * leaves a version running forever.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('analyses', (t) => {
    t.bigIncrements('id').primary()
    t.bigInteger('lab_id').notNullable().references('id').inTable('labs')
    // The project at creation. A dataset can move to another project later; lists and filters follow
    // the dataset's current project, so this column is a record, not the source of truth.
    t.bigInteger('project_id').notNullable().references('id').inTable('projects')
    t.bigInteger('dataset_id').notNullable().references('id').inTable('datasets')
    t.text('name').notNullable()
    t.bigInteger('created_by').notNullable().references('id').inTable('users')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.index(['lab_id', 'updated_at'])
    t.index(['project_id'])
    t.index(['dataset_id'])
  })
  await knex.raw(`ALTER TABLE analyses ADD CONSTRAINT analyses_name_not_blank CHECK (length(trim(name)) > 0)`)

  await knex.schema.createTable('analysis_versions', (t) => {
    t.bigIncrements('id').primary()
    t.bigInteger('analysis_id').notNullable().references('id').inTable('analyses').onDelete('CASCADE')
    t.integer('version_no').notNullable()
    t.bigInteger('dataset_version_id').notNullable().references('id').inTable('dataset_versions')
    // The file checksum as it was when the version was made (dataset versions never change, but the
    // copy keeps a stored result self-describing).
    t.text('dataset_sha256').notNullable()
    t.jsonb('settings').notNullable()
    // Exclusions active on the dataset version at creation; every run of this version applies these.
    t.jsonb('exclusions').notNullable().defaultTo('[]')
    t.text('engine_version').notNullable()
    t.text('status').notNullable().defaultTo('queued')
    t.jsonb('progress')
      .notNullable()
      .defaultTo(JSON.stringify({ stage: 'queued', fraction: 0 }))
    t.jsonb('result').nullable()
    t.jsonb('chart').nullable()
    t.jsonb('error').nullable()
    t.integer('run_ms').nullable()
    // Job bookkeeping: who holds the row, since when it last proved alive, how often it was started.
    t.uuid('claim_token').nullable()
    t.timestamp('heartbeat_at', { useTz: true }).nullable()
    t.integer('attempts').notNullable().defaultTo(0)
    t.bigInteger('created_by').notNullable().references('id').inTable('users')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('started_at', { useTz: true }).nullable()
    t.timestamp('finished_at', { useTz: true }).nullable()
    t.unique(['analysis_id', 'version_no'])
    t.index(['dataset_version_id'])
  })
  await knex.raw(`
    ALTER TABLE analysis_versions
      ADD CONSTRAINT analysis_versions_status_known CHECK (status IN ('queued', 'running', 'done', 'failed')),
      ADD CONSTRAINT analysis_versions_version_no_positive CHECK (version_no > 0),
      ADD CONSTRAINT analysis_versions_done_has_result CHECK (status <> 'done' OR (result IS NOT NULL AND chart IS NOT NULL)),
      ADD CONSTRAINT analysis_versions_failed_has_error CHECK (status <> 'failed' OR error IS NOT NULL)
  `)
  // A finished version is a record: PostgreSQL refuses any change to it, whatever the caller.
  await knex.raw(`
    CREATE FUNCTION analysis_versions_freeze_finished() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF OLD.status IN ('done', 'failed') THEN
        RAISE EXCEPTION 'analysis version % is finished and cannot change', OLD.id USING ERRCODE = 'insufficient_privilege';
      END IF;
      RETURN NEW;
    END
    $$
  `)
  await knex.raw(`
    CREATE TRIGGER analysis_versions_freeze_finished BEFORE UPDATE ON analysis_versions
      FOR EACH ROW EXECUTE FUNCTION analysis_versions_freeze_finished()
  `)
  // The queue: only unfinished rows, oldest first.
  await knex.raw(
    `CREATE INDEX analysis_versions_queue ON analysis_versions (created_at, id) WHERE status IN ('queued', 'running')`,
  )
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('analysis_versions')
  await knex.raw('DROP FUNCTION analysis_versions_freeze_finished()')
  await knex.schema.dropTable('analyses')
}
