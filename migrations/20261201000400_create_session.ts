import type { Knex } from 'knex'

// The table connect-pg-simple expects (its table.sql), created here so the app never needs DDL rights
// at runtime. `expire` carries a time zone so expiry survives a change of the server's time zone.
export async function up(knex: Knex): Promise<void> {
  await knex.raw(`
    CREATE TABLE "session" (
      "sid" varchar NOT NULL COLLATE "default" PRIMARY KEY,
      "sess" json NOT NULL,
      "expire" timestamp(6) with time zone NOT NULL
    )
  `)
  await knex.raw('CREATE INDEX "IDX_session_expire" ON "session" ("expire")')
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('session')
}
