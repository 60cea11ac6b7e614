import { expect, it } from 'vitest'
import { db } from '../../server/db'
import {
  datasetsTestApp,
  deleteAs,
  postAs,
  putAs,
  signedInTeam,
  uploadDataset,
  uploadVersion,
} from './datasets-support'

const { app, csv } = datasetsTestApp()

async function actionsFor(datasetId: number): Promise<string[]> {
  const rows = await db('audit_events')
    .where({ subject_type: 'dataset', subject_id: String(datasetId) })
    .orderBy('id')
    .select('action')
  return rows.map((r) => r.action)
}

it('records upload, new version, tagging and exclusion changes in the audit log, in the lab', async () => {
  const team = await signedInTeam(app)
  const upload = await uploadDataset(app, team.cookies.scientist, csv, 'cells.csv', {
    labId: team.lab.id,
  })
  expect(upload.status).toBe(201)
  const datasetId = upload.body.data.id
  const base = `/api/v1/datasets/${datasetId}/versions/1`
  const tagged = await putAs(app, team.cookies.scientist, `${base}/tagging`, {
    responseColumns: ['neurite_length_um'],
    conditionColumn: 'treatment',
    levels: ['lab', 'mouse'],
  })
  expect(tagged.status).toBe(200)
  const excluded = await postAs(app, team.cookies.scientist, `${base}/exclusions`, {
    kind: 'rule',
    rule: { column: 'neurite_length_um', operator: 'gt', value: 145 },
    reason: 'Cells overlapped in the image',
  })
  expect(excluded.status).toBe(201)
  const withdrawn = await deleteAs(app, team.cookies.scientist, `${base}/exclusions/${excluded.body.data.id}`)
  expect(withdrawn.status).toBe(200)
  const second = await uploadVersion(app, team.cookies.scientist, datasetId, csv, 'v2.csv')
  expect(second.status).toBe(201)

  expect(await actionsFor(datasetId)).toEqual([
    'dataset.uploaded',
    'dataset.tagging_changed',
    'dataset.exclusion_added',
    'dataset.exclusion_withdrawn',
    'dataset.version_added',
  ])
  const labIds = await db('audit_events')
    .where({ subject_type: 'dataset', subject_id: String(datasetId) })
    .distinct('lab_id')
  expect(labIds.map((r) => r.lab_id)).toEqual([team.lab.id])
})
