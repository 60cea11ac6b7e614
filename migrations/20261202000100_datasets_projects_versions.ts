import type { Knex } from 'knex'

/**
 * Projects, datasets and their immutable versions. The rows of each version live in their own table
 * `dataset_rows_<version id>` (row_no + one text column per file column), created by ingest in the
 * same transaction as the version's metadata; this migration only creates the catalogue around them.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('projects', (t) => {
    t.bigIncrements('id').primary()
    t.bigInteger('lab_id').notNullable().references('id').inTable('labs').onDelete('CASCADE')
    t.text('name').notNullable()
    t.text('description').notNullable().defaultTo('')
    t.bigInteger('created_by').notNullable().references('id').inTable('users')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.unique(['lab_id', 'name'])
    // Target of the datasets' (project_id, lab_id) key, so a dataset's project is always in its lab.
    t.unique(['id', 'lab_id'])
  })
  await knex.raw(`ALTER TABLE projects ADD CONSTRAINT projects_name_not_blank CHECK (length(trim(name)) > 0)`)

  await knex.schema.createTable('datasets', (t) => {
    t.bigIncrements('id').primary()
    t.bigInteger('lab_id').notNullable().references('id').inTable('labs')
    t.bigInteger('project_id').notNullable()
    t.text('name').notNullable()
    t.text('description').notNullable().defaultTo('')
    t.bigInteger('created_by').notNullable().references('id').inTable('users')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('deleted_at', { useTz: true }).nullable()
    t.bigInteger('deleted_by').nullable().references('id').inTable('users')
    t.foreign(['project_id', 'lab_id']).references(['id', 'lab_id']).inTable('projects')
    t.index(['lab_id'])
    t.index(['project_id'])
  })
  await knex.raw(`ALTER TABLE datasets ADD CONSTRAINT datasets_name_not_blank CHECK (length(trim(name)) > 0)`)

  await knex.schema.createTable('dataset_versions', (t) => {
    t.bigIncrements('id').primary()
    t.bigInteger('dataset_id').notNullable().references('id').inTable('datasets')
    t.integer('version_no').notNullable()
    t.text('original_filename').notNullable()
    t.bigInteger('byte_size').notNullable()
    t.text('sha256').notNullable()
    t.text('file_type').notNullable()
    t.text('encoding').notNullable()
    t.text('delimiter').nullable()
    t.text('decimal_mark').notNullable()
    t.text('sheet_name').nullable()
    t.jsonb('sheet_names').notNullable().defaultTo('[]')
    // File row of the header (1 for CSV; a sheet may start lower). Data row k is file row header_row + k.
    t.integer('header_row').notNullable().defaultTo(1)
    t.bigInteger('row_count').notNullable().defaultTo(0)
    t.integer('column_count').notNullable().defaultTo(0)
    t.bigInteger('excluded_row_count').notNullable().defaultTo(0)
    // Ingest commits a version only once stored and profiled ('ready'); the other states are for a
    // future background path and for the startup sweep, which removes anything left 'processing'.
    t.text('status').notNullable().defaultTo('processing')
    t.text('error_message').nullable()
    t.jsonb('na_values').notNullable()
    t.jsonb('suggestion').nullable()
    t.integer('ingest_ms').notNullable().defaultTo(0)
    t.bigInteger('created_by').notNullable().references('id').inTable('users')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.unique(['dataset_id', 'version_no'])
    t.index(['sha256'])
  })
  await knex.raw(`
    ALTER TABLE dataset_versions
      ADD CONSTRAINT dataset_versions_sha256_hex CHECK (sha256 ~ '^[0-9a-f]{64}$'),
      ADD CONSTRAINT dataset_versions_file_type_known CHECK (file_type IN ('csv', 'xlsx')),
      ADD CONSTRAINT dataset_versions_decimal_mark_known CHECK (decimal_mark IN ('.', ',')),
      ADD CONSTRAINT dataset_versions_status_known CHECK (status IN ('processing', 'ready', 'failed')),
      ADD CONSTRAINT dataset_versions_version_no_positive CHECK (version_no > 0)
  `)

  await knex.schema.createTable('dataset_columns', (t) => {
    t.bigInteger('version_id').notNullable().references('id').inTable('dataset_versions').onDelete('CASCADE')
    t.integer('position').notNullable()
    t.text('name').notNullable()
    t.text('type').notNullable()
    t.bigInteger('missing_count').notNullable()
    t.integer('distinct_count').notNullable()
    t.boolean('distinct_capped').notNullable()
    t.double('min').nullable()
    t.double('max').nullable()
    t.double('mean').nullable()
    t.double('sd').nullable()
    t.jsonb('sample_values').notNullable()
    t.jsonb('top_values').nullable()
    t.primary(['version_id', 'position'])
    t.unique(['version_id', 'name'])
  })
  await knex.raw(
    `ALTER TABLE dataset_columns ADD CONSTRAINT dataset_columns_type_known CHECK (type IN ('integer', 'numeric', 'text', 'empty'))`,
  )

  // Append-only: the current tagging of a version is its newest row; older rows are the history.
  await knex.schema.createTable('dataset_taggings', (t) => {
    t.bigIncrements('id').primary()
    t.bigInteger('version_id').notNullable().references('id').inTable('dataset_versions').onDelete('CASCADE')
    t.jsonb('response_columns').notNullable()
    t.text('condition_column').nullable()
    t.jsonb('levels').notNullable()
    t.boolean('carried_over').notNullable().defaultTo(false)
    t.bigInteger('created_by').notNullable().references('id').inTable('users')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.index(['version_id', 'id'])
  })

  await knex.schema.createTable('dataset_exclusions', (t) => {
    t.bigIncrements('id').primary()
    t.bigInteger('version_id').notNullable().references('id').inTable('dataset_versions').onDelete('CASCADE')
    t.text('kind').notNullable()
    t.jsonb('rule').nullable()
    t.jsonb('unit').nullable()
    t.text('reason').notNullable()
    t.bigInteger('matched_rows').notNullable()
    t.bigInteger('created_by').notNullable().references('id').inTable('users')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('removed_at', { useTz: true }).nullable()
    t.bigInteger('removed_by').nullable().references('id').inTable('users')
    t.index(['version_id'])
  })
  await knex.raw(`
    ALTER TABLE dataset_exclusions
      ADD CONSTRAINT dataset_exclusions_kind_shape CHECK (
        (kind = 'rule' AND rule IS NOT NULL AND unit IS NULL) OR (kind = 'unit' AND unit IS NOT NULL AND rule IS NULL)
      ),
      ADD CONSTRAINT dataset_exclusions_reason_not_blank CHECK (length(trim(reason)) > 0)
  `)
}

export async function down(knex: Knex): Promise<void> {
  const versions: { id: number }[] = await knex('dataset_versions').select('id')
  for (const { id } of versions) await knex.raw('DROP TABLE IF EXISTS ??', [`dataset_rows_${id}`])
  await knex.schema.dropTable('dataset_exclusions')
  await knex.schema.dropTable('dataset_taggings')
  await knex.schema.dropTable('dataset_columns')
  await knex.schema.dropTable('dataset_versions')
  await knex.schema.dropTable('datasets')
  await knex.schema.dropTable('projects')
}
