import { register } from 'tsx/esm/api'
import { beforeAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { datasetsTestApp, signedInTeam, uploadDataset } from './datasets-support'

const { app, csv } = datasetsTestApp()
const MIGRATION = '20261210000200_freeze_dataset_rows.ts'

let table = ''
beforeAll(async () => {
  const team = await signedInTeam(app)
  const res = await uploadDataset(app, team.cookies.scientist, csv, 'final.csv', { labId: team.lab.id })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  table = `dataset_rows_${res.body.data.latestVersion.id}`
})

/** The error PostgreSQL raises for a statement, or null when it went through (rolled back either way). */
async function attempt(sql: string): Promise<string | null> {
  try {
    await db.transaction(async (trx) => {
      await trx.raw(sql)
      throw new Error('rolled back')
    })
  } catch (error) {
    const message = (error as Error).message
    return message === 'rolled back' ? null : message
  }
  return null
}

describe('the rows of a stored version', () => {
  it('cannot be inserted, updated, deleted or truncated', async () => {
    for (const sql of [
      `UPDATE ${table} SET c5 = '999' WHERE row_no = 1`,
      `DELETE FROM ${table} WHERE row_no = 1`,
      `INSERT INTO ${table} (c1) VALUES ('extra')`,
      `TRUNCATE ${table}`,
    ]) {
      expect(await attempt(sql), sql).toMatch(/the rows of a stored dataset version are final/)
    }
    expect((await db(table).count<{ count: number }[]>('* as count'))[0].count).toBe(40)
  })

  it('are frozen by the migration for versions stored before it, and released by its down', async () => {
    // knex imports the TypeScript migrations with Node's own import(), which vitest's runner does not cover.
    const unregister = register()
    try {
      await db.migrate.down({ name: MIGRATION })
      expect(await attempt(`UPDATE ${table} SET c5 = '999' WHERE row_no = 1`)).toBeNull()
      await db.migrate.up({ name: MIGRATION })
      expect(await attempt(`UPDATE ${table} SET c5 = '999' WHERE row_no = 1`)).toMatch(/final/)
    } finally {
      await unregister()
    }
  })
})
