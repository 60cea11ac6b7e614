import type { Knex } from 'knex'

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('memberships', (t) => {
    t.bigInteger('user_id').notNullable().references('id').inTable('users').onDelete('CASCADE')
    t.bigInteger('lab_id').notNullable().references('id').inTable('labs').onDelete('CASCADE')
    t.text('role').notNullable()
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.primary(['user_id', 'lab_id'])
    // The primary key serves lookups by user; lab pages list members by lab.
    t.index(['lab_id'])
  })
  await knex.raw(`
    ALTER TABLE memberships
      ADD CONSTRAINT memberships_role_known CHECK (role IN ('scientist', 'pi', 'biostatistician'))
  `)
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('memberships')
}
