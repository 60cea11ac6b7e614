import type { Knex } from 'knex'

/**
 * Review and sign-off of analysis versions, and read-only share links.
 * - review_requests: one request of one version, addressed to one biostatistician of the lab.
 * - review_comments: a thread on a version (parent_id for replies), kept forever.
 * - sign_offs: who signed which exact version when, with a SHA-256 over what they saw (dataset
 *   checksum, settings, engine version, result), so a later change to the stored result shows.
 * - share_links: only the SHA-256 of the token is stored; the link itself lives in the holder's hands.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('review_requests', (t) => {
    t.bigIncrements('id').primary()
    t.bigInteger('analysis_version_id')
      .notNullable()
      .references('id')
      .inTable('analysis_versions')
      .onDelete('CASCADE')
    t.bigInteger('requested_by').notNullable().references('id').inTable('users')
    t.bigInteger('reviewer_id').notNullable().references('id').inTable('users')
    t.text('message').notNullable().defaultTo('')
    t.text('status').notNullable().defaultTo('open')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('decided_at', { useTz: true }).nullable()
    t.index(['reviewer_id', 'status'])
    t.index(['analysis_version_id'])
  })
  await knex.raw(`
    ALTER TABLE review_requests
      ADD CONSTRAINT review_requests_status_known
        CHECK (status IN ('open', 'changes_requested', 'signed_off', 'withdrawn'))
  `)
  // One open request per version and reviewer: asking twice is the same question.
  await knex.raw(`
    CREATE UNIQUE INDEX review_requests_one_open
      ON review_requests (analysis_version_id, reviewer_id) WHERE status = 'open'
  `)

  await knex.schema.createTable('review_comments', (t) => {
    t.bigIncrements('id').primary()
    t.bigInteger('analysis_version_id')
      .notNullable()
      .references('id')
      .inTable('analysis_versions')
      .onDelete('CASCADE')
    t.bigInteger('parent_id').nullable().references('id').inTable('review_comments')
    t.bigInteger('author_id').notNullable().references('id').inTable('users')
    t.text('body').notNullable()
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.index(['analysis_version_id', 'created_at'])
  })
  await knex.raw(
    `ALTER TABLE review_comments ADD CONSTRAINT review_comments_body_not_blank CHECK (length(trim(body)) > 0)`,
  )

  await knex.schema.createTable('sign_offs', (t) => {
    t.bigIncrements('id').primary()
    t.bigInteger('analysis_version_id')
      .notNullable()
      .references('id')
      .inTable('analysis_versions')
      .onDelete('CASCADE')
    t.bigInteger('review_request_id').nullable().references('id').inTable('review_requests')
    t.bigInteger('signed_by').notNullable().references('id').inTable('users')
    t.timestamp('signed_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.text('hash').notNullable()
    t.unique(['analysis_version_id', 'signed_by'])
  })
  await knex.raw(`ALTER TABLE sign_offs ADD CONSTRAINT sign_offs_hash_sha256 CHECK (hash ~ '^[0-9a-f]{64}$')`)

  await knex.schema.createTable('share_links', (t) => {
    t.bigIncrements('id').primary()
    t.bigInteger('analysis_version_id')
      .notNullable()
      .references('id')
      .inTable('analysis_versions')
      .onDelete('CASCADE')
    t.text('token_hash').notNullable().unique()
    t.boolean('allow_unit_table').notNullable().defaultTo(false)
    t.text('note').notNullable().defaultTo('')
    t.bigInteger('created_by').notNullable().references('id').inTable('users')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('expires_at', { useTz: true }).notNullable()
    t.timestamp('revoked_at', { useTz: true }).nullable()
    t.bigInteger('revoked_by').nullable().references('id').inTable('users')
    t.integer('open_count').notNullable().defaultTo(0)
    t.timestamp('last_opened_at', { useTz: true }).nullable()
    t.index(['analysis_version_id'])
  })
  await knex.raw(
    `ALTER TABLE share_links ADD CONSTRAINT share_links_token_hash_sha256 CHECK (token_hash ~ '^[0-9a-f]{64}$')`,
  )
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('share_links')
  await knex.schema.dropTable('sign_offs')
  await knex.schema.dropTable('review_comments')
  await knex.schema.dropTable('review_requests')
}
