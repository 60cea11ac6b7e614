import { rm, writeFile } from 'node:fs/promises'
import type { Knex } from 'knex'
import { ingestConfig } from '../server/ingest/ingest-config'
import { storeSeedDataset } from '../server/services/datasets-upload.service'
import { tempUploads } from '../server/uploads/temp-files'
import { demoDatasets } from './data/demo-datasets'

/**
 * Demo datasets, stored through the real ingest (COPY, profiles, nesting suggestion) and tagged.
 * Idempotent: a dataset whose name already exists in its lab (and is not deleted) is left alone.
 * Runs after 01-demo-people, whose labs and people it needs.
 */
export async function seed(knex: Knex): Promise<void> {
  const temp = tempUploads(ingestConfig.uploadsRoot)
  for (const dataset of demoDatasets()) {
    const lab: { id: number } | undefined = await knex('labs').where({ slug: dataset.labSlug }).first('id')
    const user: { id: number } | undefined = await knex('users')
      .where({ email: dataset.uploaderEmail })
      .first('id')
    if (!lab || !user)
      throw new Error(
        `demo datasets need the demo people first (lab ${dataset.labSlug}, user ${dataset.uploaderEmail})`,
      )
    const existing = await knex('datasets')
      .where({ lab_id: lab.id, name: dataset.name })
      .whereNull('deleted_at')
      .first('id')
    if (existing) continue
    const path = temp.pathFor(dataset.filename)
    const bytes = Buffer.from(dataset.csv, 'utf8')
    await writeFile(path, bytes)
    try {
      await storeSeedDataset(knex, {
        labId: lab.id,
        projectName: dataset.project,
        name: dataset.name,
        description: dataset.description,
        userId: user.id,
        file: { path, originalName: dataset.filename, size: bytes.length },
        tagging: dataset.tagging,
      })
    } finally {
      await rm(path, { force: true })
    }
  }
}
