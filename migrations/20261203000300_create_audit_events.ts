import type { Knex } from 'knex'

// The audit log is append-only: PostgreSQL itself refuses UPDATE, DELETE and TRUNCATE, so neither
// the app nor a mistaken script can rewrite history. Actor and lab are plain ids, not foreign keys:
// an ON DELETE action would have to update rows, and entries must outlive the people and labs they name.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('audit_events', (t) => {
    t.bigIncrements('id').primary()
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.bigInteger('actor_user_id').nullable()
    t.bigInteger('lab_id').nullable()
    t.text('action').notNullable()
    t.text('subject_type').nullable()
    t.text('subject_id').nullable()
    t.jsonb('details').notNullable().defaultTo('{}')
    t.text('request_id').nullable()
    t.text('ip').nullable()
    t.index(['lab_id', 'at'])
    t.index(['at'])
    t.index(['actor_user_id', 'at'])
    t.index(['action', 'at'])
  })
  await knex.raw(`
    CREATE FUNCTION audit_events_reject_change() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION 'audit_events is append-only (% refused)', TG_OP USING ERRCODE = 'insufficient_privilege';
    END
    $$
  `)
  await knex.raw(`
    CREATE TRIGGER audit_events_no_update_or_delete
      BEFORE UPDATE OR DELETE ON audit_events
      FOR EACH ROW EXECUTE FUNCTION audit_events_reject_change()
  `)
  await knex.raw(`
    CREATE TRIGGER audit_events_no_truncate
      BEFORE TRUNCATE ON audit_events
      FOR EACH STATEMENT EXECUTE FUNCTION audit_events_reject_change()
  `)
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('audit_events')
  await knex.raw('DROP FUNCTION audit_events_reject_change()')
}
