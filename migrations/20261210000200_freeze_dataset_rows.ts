import type { Knex } from 'knex'

/**
 * The rows of a stored dataset version are final, like a finished analysis version: analyses,
 * their sign-off hashes and share links refer to exactly these rows. Each rows table
 * (dataset_rows_<version id>) gets a statement trigger that refuses INSERT, UPDATE, DELETE and
 * TRUNCATE; the app adds it when it stores a version (rows-store/rows-tables.ts, freezeRowsTable),
 * and this migration adds it to the tables of versions stored before. DROP TABLE (the leftover
 * sweep) is not affected.
 */
const ROWS_TABLES = `SELECT tablename FROM pg_tables WHERE schemaname = current_schema() AND tablename ~ '^dataset_rows_[0-9]+$'`

export async function up(knex: Knex): Promise<void> {
  await knex.raw(`
    CREATE FUNCTION dataset_rows_frozen() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION 'the rows of a stored dataset version are final (%)', TG_TABLE_NAME
        USING ERRCODE = 'insufficient_privilege';
    END
    $$
  `)
  const tables = (await knex.raw(ROWS_TABLES)).rows as { tablename: string }[]
  for (const { tablename } of tables) {
    await knex.raw(
      `CREATE TRIGGER ${tablename}_frozen BEFORE INSERT OR UPDATE OR DELETE OR TRUNCATE ON ${tablename} FOR EACH STATEMENT EXECUTE FUNCTION dataset_rows_frozen()`,
    )
  }
}

export async function down(knex: Knex): Promise<void> {
  const tables = (await knex.raw(ROWS_TABLES)).rows as { tablename: string }[]
  for (const { tablename } of tables)
    await knex.raw(`DROP TRIGGER IF EXISTS ${tablename}_frozen ON ${tablename}`)
  await knex.raw('DROP FUNCTION dataset_rows_frozen()')
}
