import type { Knex } from 'knex'

// Invitations to join a lab. Only the SHA-256 of the e-mailed token is stored, so a copy of the
// database cannot be used to join labs. An invitation is open while accepted_at and revoked_at are
// both null and expires_at lies ahead.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('invitations', (t) => {
    t.bigIncrements('id').primary()
    t.bigInteger('lab_id').notNullable().references('id').inTable('labs').onDelete('CASCADE')
    t.text('email').notNullable()
    t.text('role').notNullable()
    t.text('token_hash').notNullable().unique()
    t.bigInteger('invited_by').nullable().references('id').inTable('users').onDelete('SET NULL')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('expires_at', { useTz: true }).notNullable()
    t.timestamp('accepted_at', { useTz: true }).nullable()
    t.bigInteger('accepted_by').nullable().references('id').inTable('users').onDelete('SET NULL')
    t.timestamp('revoked_at', { useTz: true }).nullable()
    t.bigInteger('revoked_by').nullable().references('id').inTable('users').onDelete('SET NULL')
    t.index(['lab_id', 'created_at'])
  })
  await knex.raw(`
    ALTER TABLE invitations
      ADD CONSTRAINT invitations_role_known CHECK (role IN ('scientist', 'pi', 'biostatistician')),
      ADD CONSTRAINT invitations_email_lowercase CHECK (email = lower(email)),
      ADD CONSTRAINT invitations_token_hash_sha256 CHECK (token_hash ~ '^[0-9a-f]{64}$'),
      ADD CONSTRAINT invitations_closed_once CHECK (accepted_at IS NULL OR revoked_at IS NULL)
  `)
  // At most one unanswered invitation per person and lab: a new one replaces (revokes) the old.
  await knex.raw(`
    CREATE UNIQUE INDEX invitations_one_open_per_lab_email
      ON invitations (lab_id, email) WHERE accepted_at IS NULL AND revoked_at IS NULL
  `)
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('invitations')
}
