import { createHash } from 'node:crypto'
import { request as httpRequest } from 'node:http'
import type { AddressInfo } from 'node:net'
import { spawnSync } from 'node:child_process'
import { existsSync, mkdirSync, readdirSync, rmSync, writeFileSync } from 'node:fs'
import { hostname } from 'node:os'
import { join } from 'node:path'
import request from 'supertest'
import { beforeAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { ingestConfig } from '../../server/ingest/ingest-config'
import { originalStore } from '../../server/originals'
import { sweepDatasetLeftovers } from '../../server/services/datasets-upload.service'
import { uploadTemp } from '../../server/uploads/upload-intake'
import { loadNestedColumns } from '../../server/rows-store/read-back'
import { appWriteHeaders } from '../support/api'
import {
  datasetsTestApp,
  getAs,
  patchAs,
  postAs,
  putAs,
  signedInTeam,
  smallCellTable,
  uploadDataset,
  uploadVersion,
  type SignedInTeam,
} from './datasets-support'

const { app, csv } = datasetsTestApp()

let team: SignedInTeam
beforeAll(async () => {
  team = await signedInTeam(app)
})

describe('upload and profile', () => {
  it('stores a CSV, profiles its columns and suggests the nesting', async () => {
    const res = await uploadDataset(app, team.cookies.scientist, csv, 'outgrowth.csv', { labId: team.lab.id })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const dataset = res.body.data
    expect(dataset).toMatchObject({
      name: 'outgrowth',
      labId: team.lab.id,
      labName: team.lab.name,
      project: { name: 'Neurite outgrowth' },
      versionCount: 1,
      deletedAt: null,
    })
    expect(dataset.latestVersion).toMatchObject({
      versionNo: 1,
      rowCount: 40,
      columnCount: 5,
      delimiter: ',',
      encoding: 'utf-8',
      status: 'ready',
      byteSize: csv.length,
      originalFilename: 'outgrowth.csv',
    })
    expect(dataset.latestVersion.sha256).toBe(createHash('sha256').update(csv).digest('hex'))
    const detail = await getAs(app, team.cookies.biostatistician, `/api/v1/datasets/${dataset.id}/versions/1`)
    expect(detail.status).toBe(200)
    const columns = detail.body.data.columns
    expect(columns.map((c: { type: string }) => c.type)).toEqual([
      'text',
      'text',
      'text',
      'integer',
      'numeric',
    ])
    expect(columns[1]).toMatchObject({
      name: 'mouse',
      distinctCount: 4,
      missingCount: 0,
      sampleValues: ['m1', 'm2', 'm3', 'm4'],
    })
    expect(columns[3]).toMatchObject({ name: 'cell', min: 1, max: 5 })
    // cells 1…5 in each of 8 mice: mean 3, SD √(80/39) (by hand); Welford's running mean rounds in the last bit.
    expect(columns[3].mean).toBeCloseTo(3, 12)
    expect(columns[3].sd).toBeCloseTo(Math.sqrt(80 / 39), 12)
    const suggestion = detail.body.data.suggestion
    expect(suggestion).toMatchObject({
      conditionColumn: 'treatment',
      conditionLevel: 'mouse',
      conditionPlacement: 'between-units',
      responseColumns: ['neurite_length_um'],
    })
    expect(suggestion.levels).toEqual([
      { column: 'lab', unitCount: 2, perParent: null, reusedLabels: [], reusedLabelCount: 0 },
      {
        column: 'mouse',
        unitCount: 8,
        perParent: { min: 4, median: 4, max: 4 },
        reusedLabels: ['m1', 'm2', 'm3', 'm4'],
        reusedLabelCount: 4,
      },
    ])
    expect(suggestion.explanation.length).toBeGreaterThan(3)
    expect(detail.body.data.tagging).toBeNull()
  })

  it('keeps the original bytes under their SHA-256 and serves them back', async () => {
    const res = await uploadDataset(app, team.cookies.scientist, csv, 'again.csv', { labId: team.lab.id })
    const sha = res.body.data.latestVersion.sha256
    expect(await originalStore().exists(sha)).toBe(true)
    const original = await getAs(
      app,
      team.cookies.biostatistician,
      `/api/v1/datasets/${res.body.data.id}/versions/1/original`,
    )
      .buffer(true)
      .parse((r, done) => {
        const chunks: Buffer[] = []
        r.on('data', (c: Buffer) => chunks.push(c))
        r.on('end', () => done(null, Buffer.concat(chunks)))
      })
    expect(original.status).toBe(200)
    expect(original.headers['content-disposition']).toContain('again.csv')
    expect(Buffer.compare(original.body as Buffer, csv)).toBe(0)
    // The temporary upload is gone once the request is over.
    expect(readdirSync(uploadTemp.dir).filter((n) => n.endsWith('.csv'))).toEqual([])
  })

  it('reports progress to the uploader under the token the client chose, and to nobody else', async () => {
    const token = `test-${Date.now().toString(36)}`
    const res = await uploadDataset(app, team.cookies.scientist, csv, 'tracked.csv', {
      labId: team.lab.id,
      token,
    })
    expect(res.status).toBe(201)
    const progress = await getAs(app, team.cookies.scientist, `/api/v1/datasets/uploads/${token}`)
    expect(progress.body.data).toMatchObject({ token, phase: 'done', rowsStored: 40, message: null })
    expect(progress.body.data.bytesRead).toBe(progress.body.data.bytesTotal)
    expect((await getAs(app, team.cookies.pi, `/api/v1/datasets/uploads/${token}`)).status).toBe(404)

    const failing = `fail-${Date.now().toString(36)}`
    const bad = await uploadDataset(app, team.cookies.scientist, Buffer.from('a,b\n1\n2,3\n'), 'bad.csv', {
      labId: team.lab.id,
      token: failing,
    })
    expect(bad.status).toBe(400)
    const failed = await getAs(app, team.cookies.scientist, `/api/v1/datasets/uploads/${failing}`)
    expect(failed.body.data).toMatchObject({ phase: 'failed', message: bad.body.error.message })
  })

  it('takes a field sent after the file (the live ingest started without it is dropped, nothing stored twice)', async () => {
    const res = await request(app)
      .post('/api/v1/datasets')
      .set(appWriteHeaders)
      .set('Cookie', team.cookies.scientist)
      .field('labId', String(team.lab.id))
      .field('projectName', 'Late fields')
      .attach('file', csv, 'early.csv')
      .field('name', 'Named after the file arrived')
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.data.name).toBe('Named after the file arrived')
    const project = await db('projects').where({ lab_id: team.lab.id, name: 'Late fields' }).first('id')
    expect(await db('datasets').where({ project_id: project.id }).count<{ n: number }[]>('* as n')).toEqual([
      { n: 1 },
    ])
  })

  it('asks for a file and for a project', async () => {
    const noFile = await request(app)
      .post('/api/v1/datasets')
      .set({ Origin: 'http://127.0.0.1:3000', 'X-Requested-With': 'nestwise' })
      .set('Cookie', team.cookies.scientist)
      .field('labId', String(team.lab.id))
      .field('projectName', 'x')
    expect(noFile.status).toBe(400)
    expect(noFile.body.error.message).toContain('Choose a file')
    const noProject = await request(app)
      .post('/api/v1/datasets')
      .set({ Origin: 'http://127.0.0.1:3000', 'X-Requested-With': 'nestwise' })
      .set('Cookie', team.cookies.scientist)
      .field('labId', String(team.lab.id))
      .attach('file', csv, 'x.csv')
    expect(noProject.status).toBe(400)
  })
})

describe('cancelled uploads', () => {
  it('stop and store nothing when the uploader goes away while the rows are being stored', async () => {
    const server = app.listen(0, '127.0.0.1')
    await new Promise((resolve) => server.once('listening', resolve))
    const { port } = server.address() as AddressInfo
    try {
      const lines = ['lab,mouse,treatment,cell,length']
      for (let k = 0; k < 400_000; k++)
        lines.push(`L${k % 7},m${k % 13},${k % 2 ? 'vehicle' : 'NW-117'},${k},${(k % 997) / 7}`)
      const body = Buffer.from(lines.join('\n') + '\n')
      const boundary = 'nestwise-cancel-test'
      const payload = Buffer.concat([
        Buffer.from(
          `--${boundary}\r\nContent-Disposition: form-data; name="labId"\r\n\r\n${team.lab.id}\r\n--${boundary}\r\nContent-Disposition: form-data; name="projectName"\r\n\r\nCancelled\r\n`,
        ),
        Buffer.from(
          `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="cancel.csv"\r\n\r\n`,
        ),
        body,
        Buffer.from(`\r\n--${boundary}--\r\n`),
      ])
      const token = `cancel-${Date.now().toString(36)}`
      const req = httpRequest({
        host: '127.0.0.1',
        port,
        path: '/api/v1/datasets',
        method: 'POST',
        headers: {
          ...appWriteHeaders,
          Cookie: team.cookies.scientist,
          'X-Upload-Token': token,
          'Content-Type': `multipart/form-data; boundary=${boundary}`,
          'Content-Length': payload.length,
        },
      })
      req.on('error', () => {})
      // Only part of the file is sent: the uploader goes away while the rest is still to come.
      req.write(payload.subarray(0, payload.length >> 1))
      const progressOf = async () =>
        (await getAs(app, team.cookies.scientist, `/api/v1/datasets/uploads/${token}`)).body.data
      let progress = await progressOf()
      for (let k = 0; k < 500 && progress?.phase !== 'storing'; k++) {
        await new Promise((resolve) => setTimeout(resolve, 10))
        progress = await progressOf()
      }
      expect(progress?.phase).toBe('storing')
      req.destroy()
      for (let k = 0; k < 500 && progress.phase !== 'failed'; k++) {
        await new Promise((resolve) => setTimeout(resolve, 20))
        progress = await progressOf()
      }
      expect(progress).toMatchObject({
        phase: 'failed',
        message: 'The upload was cancelled before it was stored.',
      })
      expect(await db('projects').where({ lab_id: team.lab.id, name: 'Cancelled' }).first()).toBeUndefined()
    } finally {
      await new Promise((resolve) => server.close(resolve))
    }
  })
})

describe('nesting summary', () => {
  it('says how many kept rows have no response value, so the dataset and analysis counts add up', async () => {
    const team = await signedInTeam(app)
    // Invented: the small table with three response cells emptied (rows 3, 5 and 9 of the file).
    const lines = smallCellTable().trimEnd().split('\n')
    for (const row of [2, 4, 8]) lines[row] = lines[row].replace(/,[^,]*$/, ',')
    const upload = await uploadDataset(
      app,
      team.cookies.scientist,
      Buffer.from(lines.join('\n') + '\n'),
      'gaps.csv',
      {
        labId: team.lab.id,
      },
    )
    expect(upload.status, JSON.stringify(upload.body)).toBe(201)
    const id = upload.body.data.id
    const tag = await putAs(app, team.cookies.scientist, `/api/v1/datasets/${id}/versions/1/tagging`, {
      responseColumns: ['neurite_length_um'],
      conditionColumn: 'treatment',
      levels: ['lab', 'mouse'],
    })
    expect(tag.status, JSON.stringify(tag.body)).toBe(200)
    expect(tag.body.data.design.missingValues).toEqual([{ column: 'neurite_length_um', rows: 3 }])
    // Excluding one of those rows leaves two.
    const rule = await postAs(app, team.cookies.scientist, `/api/v1/datasets/${id}/versions/1/exclusions`, {
      kind: 'rule',
      rule: { column: 'cell', operator: 'eq', value: lines[2].split(',')[3] },
      reason: 'Invented: a cell traced twice',
    })
    expect(rule.status, JSON.stringify(rule.body)).toBe(201)
    const design = await getAs(app, team.cookies.biostatistician, `/api/v1/datasets/${id}/versions/1/design`)
    // The rule leaves out every cell 2, among them one of the three rows without a value.
    expect(design.body.data.missingValues).toEqual([{ column: 'neurite_length_um', rows: 2 }])
  })
})

describe('preview', () => {
  let base: string
  beforeAll(async () => {
    const res = await uploadDataset(app, team.cookies.scientist, csv, 'preview.csv', { labId: team.lab.id })
    base = `/api/v1/datasets/${res.body.data.id}/versions/1`
  })

  it('pages rows in file order with spreadsheet row numbers', async () => {
    const page = await getAs(app, team.cookies.biostatistician, `${base}/rows?page=2&pageSize=15`)
    expect(page.status).toBe(200)
    expect(page.body.data).toMatchObject({
      total: 40,
      page: 2,
      pageSize: 15,
      columns: ['lab', 'mouse', 'treatment', 'cell', 'neurite_length_um'],
    })
    expect(page.body.data.rows.map((r: { rowNumber: number }) => r.rowNumber)).toEqual(
      Array.from({ length: 15 }, (_, k) => 17 + k),
    )
    const last = await getAs(app, team.cookies.biostatistician, `${base}/rows?page=3&pageSize=15`)
    expect(last.body.data.rows).toHaveLength(10)
    const reversed = await getAs(app, team.cookies.biostatistician, `${base}/rows?pageSize=3&sortDesc=true`)
    expect(reversed.body.data.rows.map((r: { rowNumber: number }) => r.rowNumber)).toEqual([41, 40, 39])
  })

  it('sorts numeric columns as numbers and text columns as text, on the server', async () => {
    const numeric = await getAs(
      app,
      team.cookies.scientist,
      `${base}/rows?sortBy=neurite_length_um&sortDesc=true&pageSize=40`,
    )
    const values = numeric.body.data.rows.map((r: { values: string[] }) => Number(r.values[4]))
    expect(values).toEqual([...values].sort((a, b) => b - a))
    expect(values[0]).toBe(149.25)
    const text = await getAs(app, team.cookies.scientist, `${base}/rows?sortBy=lab&pageSize=40`)
    expect(text.body.data.rows[0].values[0]).toBe('Fernhill')
    const bad = await getAs(app, team.cookies.scientist, `${base}/rows?sortBy=nope`)
    expect(bad.status).toBe(400)
    expect((await getAs(app, team.cookies.scientist, `${base}/rows?pageSize=5000`)).status).toBe(400)
  })

  it('returns the column summary', async () => {
    const res = await getAs(app, team.cookies.scientist, `${base}/columns`)
    expect(res.body.data.map((c: { name: string }) => c.name)).toEqual([
      'lab',
      'mouse',
      'treatment',
      'cell',
      'neurite_length_um',
    ])
    expect(res.body.data[2].topValues).toEqual([
      { value: 'vehicle', count: 20 },
      { value: 'NW-117', count: 20 },
    ])
  })
})

describe('tagging and versions', () => {
  it('saves a tagging with its design, keeps the history, and carries it over to a new version', async () => {
    const res = await uploadDataset(app, team.cookies.scientist, csv, 'versions.csv', { labId: team.lab.id })
    const id = res.body.data.id
    const tag = (body: object) =>
      putAs(app, team.cookies.scientist, `/api/v1/datasets/${id}/versions/1/tagging`, body)
    const first = await tag({
      responseColumns: ['neurite_length_um'],
      conditionColumn: null,
      levels: ['mouse'],
    })
    expect(first.status).toBe(200)
    const second = await tag({
      responseColumns: ['neurite_length_um'],
      conditionColumn: 'treatment',
      levels: ['lab', 'mouse'],
    })
    expect(second.status).toBe(200)
    expect(second.body.data.tagging).toMatchObject({
      responseColumns: ['neurite_length_um'],
      conditionColumn: 'treatment',
      levels: ['lab', 'mouse'],
      carriedOver: false,
      createdBy: { id: team.scientist.id },
    })
    expect(second.body.data.design).toMatchObject({
      observationCount: 40,
      conditionLevel: 'mouse',
      conditionPlacement: 'between-units',
      arms: [
        { value: 'vehicle', unitCount: 4, observationCount: 20 },
        { value: 'NW-117', unitCount: 4, observationCount: 20 },
      ],
    })
    const history = await getAs(
      app,
      team.cookies.biostatistician,
      `/api/v1/datasets/${id}/versions/1/tagging/history`,
    )
    expect(history.body.data.map((t: { levels: string[] }) => t.levels)).toEqual([
      ['lab', 'mouse'],
      ['mouse'],
    ])
    const design = await getAs(app, team.cookies.biostatistician, `/api/v1/datasets/${id}/versions/1/design`)
    expect(design.body.data.levels.map((l: { unitCount: number }) => l.unitCount)).toEqual([2, 8])

    // Version 2 adds a lab; version 1 stays exactly as it was.
    const more =
      smallCellTable() +
      'Ashgrove,m1,vehicle,1,130.5\nAshgrove,m1,vehicle,2,131.5\nAshgrove,m2,NW-117,1,140.5\nAshgrove,m2,NW-117,2,141.5\n'
    const v2 = await uploadVersion(app, team.cookies.scientist, id, Buffer.from(more), 'versions-v2.csv')
    expect(v2.status, JSON.stringify(v2.body)).toBe(201)
    expect(v2.body.data).toMatchObject({ versionNo: 2, rowCount: 44, originalFilename: 'versions-v2.csv' })
    expect(v2.body.data.tagging).toMatchObject({ levels: ['lab', 'mouse'], carriedOver: true })
    const detail = await getAs(app, team.cookies.pi, `/api/v1/datasets/${id}`)
    expect(
      detail.body.data.versions.map((v: { versionNo: number; rowCount: number }) => [
        v.versionNo,
        v.rowCount,
      ]),
    ).toEqual([
      [2, 44],
      [1, 40],
    ])
    expect(detail.body.data.latestVersion.versionNo).toBe(2)
    expect(
      (await getAs(app, team.cookies.pi, `/api/v1/datasets/${id}/versions/1/rows`)).body.data.total,
    ).toBe(40)
    expect((await getAs(app, team.cookies.pi, `/api/v1/datasets/${id}/versions/3`)).status).toBe(404)

    const columns = await loadNestedColumns(v2.body.data.id, {
      response: 'neurite_length_um',
      conditions: ['treatment'],
      covariates: [],
      levels: ['lab', 'mouse'],
    })
    expect(columns.levels[0].labels).toEqual(['Nimbus', 'Fernhill', 'Ashgrove'])
    expect(columns.response.length).toBe(44)
    expect(columns.response[43]).toBe(141.5)
  })

  it('renames, describes and moves a dataset between projects of its lab', async () => {
    const res = await uploadDataset(app, team.cookies.scientist, csv, 'rename.csv', { labId: team.lab.id })
    const patched = await patchAs(app, team.cookies.pi, `/api/v1/datasets/${res.body.data.id}`, {
      name: 'Outgrowth, March',
      description: 'Second imaging round',
    })
    expect(patched.body.data).toMatchObject({ name: 'Outgrowth, March', description: 'Second imaging round' })
    expect((await patchAs(app, team.cookies.pi, `/api/v1/datasets/${res.body.data.id}`, {})).status).toBe(400)
    expect(
      (await patchAs(app, team.cookies.pi, `/api/v1/datasets/${res.body.data.id}`, { projectId: 999_999 }))
        .status,
    ).toBe(404)
  })
})

describe('startup sweep', () => {
  it('removes versions left unfinished and rows tables without a version, in one go', async () => {
    const res = await uploadDataset(app, team.cookies.scientist, csv, 'sweep.csv', { labId: team.lab.id })
    const version = res.body.data.latestVersion
    // Simulate what a crash in a future background path could leave: a 'processing' version and an orphan table.
    await db('dataset_versions').where({ id: version.id }).update({ status: 'processing' })
    await db.raw('CREATE TABLE dataset_rows_987654321 (row_no bigint, c1 text)')
    const swept = await sweepDatasetLeftovers()
    expect(swept.versions).toBeGreaterThanOrEqual(1)
    expect(swept.tables).toBeGreaterThanOrEqual(1)
    expect(await db('dataset_versions').where({ id: version.id }).first()).toBeUndefined()
    const tables = await db.raw(
      `SELECT tablename FROM pg_tables WHERE tablename IN ('dataset_rows_${version.id}', 'dataset_rows_987654321')`,
    )
    expect(tables.rows).toEqual([])
  })

  it('removes at once the temp uploads of a server process that is gone, not those of one still running', async () => {
    const gone = spawnSync(process.execPath, ['-e', '']).pid!
    const crashed = join(ingestConfig.uploadsRoot, `${hostname()}-${gone}`)
    const running = join(ingestConfig.uploadsRoot, `${hostname()}-${process.ppid}`)
    for (const dir of [crashed, running]) {
      mkdirSync(dir, { recursive: true })
      writeFileSync(join(dir, 'half-received.csv'), 'lab,mouse\nNimbus,m1\n')
    }
    const swept = await sweepDatasetLeftovers()
    expect(swept.tempFiles).toBeGreaterThanOrEqual(1)
    expect(existsSync(crashed)).toBe(false)
    expect(existsSync(join(running, 'half-received.csv'))).toBe(true)
    rmSync(running, { recursive: true, force: true })
  })
})
