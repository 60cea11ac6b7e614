import type { Knex } from 'knex'

// mail_outbox: messages are written inside the business transaction and sent after it commits by
// the sender loop (server/mail/mail-sender.ts), so a rolled-back change never e-mails anybody.
// received_mails: what the local fake SMTP server received (development and tests only).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('mail_outbox', (t) => {
    t.bigIncrements('id').primary()
    t.text('to_address').notNullable()
    t.text('subject').notNullable()
    t.text('text_body').notNullable()
    t.text('html_body').nullable()
    t.text('kind').notNullable()
    t.text('status').notNullable().defaultTo('queued')
    t.integer('attempts').notNullable().defaultTo(0)
    t.text('last_error').nullable()
    t.timestamp('next_attempt_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.text('message_id').nullable()
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('sent_at', { useTz: true }).nullable()
  })
  await knex.raw(`
    ALTER TABLE mail_outbox
      ADD CONSTRAINT mail_outbox_status_known CHECK (status IN ('queued', 'sent', 'failed')),
      ADD CONSTRAINT mail_outbox_attempts_nonnegative CHECK (attempts >= 0)
  `)
  // The sender only ever looks for due queued messages.
  await knex.raw(`CREATE INDEX mail_outbox_due ON mail_outbox (next_attempt_at, id) WHERE status = 'queued'`)
  await knex.raw(`CREATE INDEX mail_outbox_created ON mail_outbox (created_at DESC, id DESC)`)

  await knex.schema.createTable('received_mails', (t) => {
    t.bigIncrements('id').primary()
    t.timestamp('received_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.text('envelope_from').nullable()
    t.specificType('envelope_to', 'text[]').notNullable()
    t.text('message_id').nullable()
    t.text('from_header').nullable()
    t.text('to_header').nullable()
    t.text('subject').nullable()
    t.text('text_body').nullable()
    t.text('html_body').nullable()
    t.text('raw').notNullable()
    t.index(['message_id'])
    t.index(['received_at'])
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('received_mails')
  await knex.schema.dropTable('mail_outbox')
}
