import type { Knex } from 'knex'

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('users', (t) => {
    t.bigIncrements('id').primary()
    // Stored lower-cased (the check keeps it that way), so a plain unique index is case-insensitive.
    t.text('email').notNullable().unique()
    t.text('name').notNullable()
    t.text('password_hash').notNullable()
    t.boolean('is_admin').notNullable().defaultTo(false)
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('deleted_at', { useTz: true }).nullable()
  })
  await knex.raw(`
    ALTER TABLE users
      ADD CONSTRAINT users_email_lowercase CHECK (email = lower(email)),
      ADD CONSTRAINT users_name_not_blank CHECK (length(trim(name)) > 0)
  `)
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('users')
}
