import type { Knex } from 'knex'

/**
 * Saved experiment plans. Inputs and the computed result are stored together (the result is
 * recomputed by the server from the inputs on every save, never taken from the client). A plan may
 * come from a finished analysis version and may be attached to a project of the same lab.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('plans', (t) => {
    t.bigIncrements('id').primary()
    t.bigInteger('lab_id').notNullable().references('id').inTable('labs')
    t.bigInteger('project_id').nullable().references('id').inTable('projects').onDelete('SET NULL')
    t.bigInteger('analysis_version_id')
      .nullable()
      .references('id')
      .inTable('analysis_versions')
      .onDelete('SET NULL')
    t.text('name').notNullable()
    t.jsonb('inputs').notNullable()
    t.jsonb('result').notNullable()
    t.bigInteger('created_by').notNullable().references('id').inTable('users')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.index(['lab_id', 'updated_at'])
    t.index(['project_id'])
  })
  await knex.raw(`ALTER TABLE plans ADD CONSTRAINT plans_name_not_blank CHECK (length(trim(name)) > 0)`)
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('plans')
}
