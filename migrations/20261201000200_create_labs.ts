import type { Knex } from 'knex'

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('labs', (t) => {
    t.bigIncrements('id').primary()
    t.text('name').notNullable().unique()
    t.text('slug').notNullable().unique()
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
  })
  await knex.raw(`
    ALTER TABLE labs
      ADD CONSTRAINT labs_slug_format CHECK (slug ~ '^[a-z0-9]+(-[a-z0-9]+)*$'),
      ADD CONSTRAINT labs_name_not_blank CHECK (length(trim(name)) > 0)
  `)
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('labs')
}
