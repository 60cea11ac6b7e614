import type { Knex } from 'knex'

/**
 * share_link_visits: one row per share link, visitor and hour, counting the openings in it. The
 * first opening of an hour writes the audit entry; the rest only count here and on the link, so a
 * link opened thousands of times does not fill the audit log (which refuses deletes). A visitor is
 * a keyed hash of the client address, never the address itself; rows older than two days go.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('share_link_visits', (t) => {
    t.bigInteger('share_link_id').notNullable().references('id').inTable('share_links').onDelete('CASCADE')
    t.text('visitor').notNullable()
    t.timestamp('hour', { useTz: true }).notNullable()
    t.integer('opens').notNullable().defaultTo(1)
    t.primary(['share_link_id', 'visitor', 'hour'])
    t.index(['hour'])
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('share_link_visits')
}
