import request from 'supertest'
import { beforeAll, describe, expect, it } from 'vitest'
import { signIn } from '../support/api'
import { createLab, createUser } from '../support/factories'
import {
  datasetsTestApp,
  deleteAs,
  getAs,
  patchAs,
  postAs,
  putAs,
  signedInTeam,
  uploadDataset,
  uploadVersion,
  type SignedInTeam,
} from './datasets-support'

const { app, csv } = datasetsTestApp()

let team: SignedInTeam
let outsider: string
let admin: string
let datasetId: number

beforeAll(async () => {
  team = await signedInTeam(app)
  const otherLab = await createLab()
  const stranger = await createUser({ memberships: [{ lab: otherLab, role: 'pi' }] })
  outsider = await signIn(app, stranger.email, stranger.password)
  const orla = await createUser({ isAdmin: true })
  admin = await signIn(app, orla.email, orla.password)
  const res = await uploadDataset(app, team.cookies.scientist, csv, 'cells.csv', { labId: team.lab.id })
  expect(res.status).toBe(201)
  datasetId = res.body.data.id
})

describe('who sees a dataset', () => {
  it('answers 401 without a session', async () => {
    expect((await request(app).get('/api/v1/datasets')).status).toBe(401)
    expect((await request(app).get(`/api/v1/datasets/${datasetId}`)).status).toBe(401)
  })

  it('lets every member read it: list, detail, version, rows, columns, tagging, exclusions, original', async () => {
    for (const cookie of [team.cookies.pi, team.cookies.scientist, team.cookies.biostatistician]) {
      const list = await getAs(app, cookie, '/api/v1/datasets')
      expect(list.body.data.map((d: { id: number }) => d.id)).toContain(datasetId)
      for (const path of [
        '',
        '/versions/1',
        '/versions/1/rows',
        '/versions/1/columns',
        '/versions/1/tagging',
        '/versions/1/exclusions',
        '/versions/1/suggestion',
        '/versions/1/original',
      ]) {
        const res = await getAs(app, cookie, `/api/v1/datasets/${datasetId}${path}`)
        expect(res.status, path).toBe(200)
      }
    }
  })

  it('answers 404, not 403, outside the lab — for reads and writes alike — and leaves it out of lists', async () => {
    const list = await getAs(app, outsider, '/api/v1/datasets')
    expect(list.body.data.map((d: { id: number }) => d.id)).not.toContain(datasetId)
    for (const path of ['', '/versions/1', '/versions/1/rows', '/versions/1/original']) {
      const res = await getAs(app, outsider, `/api/v1/datasets/${datasetId}${path}`)
      expect(res.status, path).toBe(404)
      expect(res.body.error.code).toBe('NOT_FOUND')
    }
    expect(
      (
        await putAs(app, outsider, `/api/v1/datasets/${datasetId}/versions/1/tagging`, {
          responseColumns: ['neurite_length_um'],
          levels: ['lab', 'mouse'],
        })
      ).status,
    ).toBe(404)
    expect((await patchAs(app, outsider, `/api/v1/datasets/${datasetId}`, { name: 'mine now' })).status).toBe(
      404,
    )
    expect((await deleteAs(app, outsider, `/api/v1/datasets/${datasetId}`)).status).toBe(404)
    expect((await uploadVersion(app, outsider, datasetId, csv, 'cells.csv')).status).toBe(404)
    // Admins manage labs and people but do not read lab data unless they are members.
    expect((await getAs(app, admin, `/api/v1/datasets/${datasetId}`)).status).toBe(404)
  })

  it('answers 404 when uploading into a lab one does not belong to', async () => {
    const res = await uploadDataset(app, outsider, csv, 'cells.csv', { labId: team.lab.id })
    expect(res.status).toBe(404)
  })
})

describe('who changes a dataset', () => {
  it('refuses uploads, tagging, exclusions and renames by a biostatistician with 403', async () => {
    const cookie = team.cookies.biostatistician
    const upload = await uploadDataset(app, cookie, csv, 'cells.csv', { labId: team.lab.id })
    expect(upload.status).toBe(403)
    expect(upload.body.error.message).toContain('need the role scientist or PI')
    expect((await uploadVersion(app, cookie, datasetId, csv, 'cells.csv')).status).toBe(403)
    expect(
      (
        await putAs(app, cookie, `/api/v1/datasets/${datasetId}/versions/1/tagging`, {
          responseColumns: ['neurite_length_um'],
          levels: ['lab', 'mouse'],
        })
      ).status,
    ).toBe(403)
    const exclusion = {
      kind: 'rule',
      rule: { column: 'neurite_length_um', operator: 'gt', value: 140 },
      reason: 'Out of focus',
    }
    expect(
      (await postAs(app, cookie, `/api/v1/datasets/${datasetId}/versions/1/exclusions`, exclusion)).status,
    ).toBe(403)
    expect((await patchAs(app, cookie, `/api/v1/datasets/${datasetId}`, { name: 'x' })).status).toBe(403)
    expect(
      (await postAs(app, cookie, '/api/v1/projects', { labId: team.lab.id, name: 'Reviews' })).status,
    ).toBe(403)
  })

  it('tells the client what the caller may do', async () => {
    const asBiostatistician = await getAs(app, team.cookies.biostatistician, `/api/v1/datasets/${datasetId}`)
    expect(asBiostatistician.body.data.permissions).toEqual({ upload: false, edit: false, delete: false })
    const asAuthor = await getAs(app, team.cookies.scientist, `/api/v1/datasets/${datasetId}`)
    expect(asAuthor.body.data.permissions).toEqual({ upload: true, edit: true, delete: true })
  })

  it('lets the author or a PI delete (softly), and only an admin restore', async () => {
    const other = await createUser({ memberships: [{ lab: team.lab, role: 'scientist' }] })
    const otherScientist = await signIn(app, other.email, other.password)
    const mine = (await uploadDataset(app, team.cookies.scientist, csv, 'mine.csv', { labId: team.lab.id }))
      .body.data.id
    expect((await deleteAs(app, otherScientist, `/api/v1/datasets/${mine}`)).status).toBe(403)
    expect((await deleteAs(app, team.cookies.biostatistician, `/api/v1/datasets/${mine}`)).status).toBe(403)
    expect((await deleteAs(app, team.cookies.scientist, `/api/v1/datasets/${mine}`)).status).toBe(204)
    expect((await getAs(app, team.cookies.scientist, `/api/v1/datasets/${mine}`)).status).toBe(404)
    expect(
      (await getAs(app, team.cookies.pi, '/api/v1/datasets')).body.data.map((d: { id: number }) => d.id),
    ).not.toContain(mine)

    const byPi = (await uploadDataset(app, otherScientist, csv, 'theirs.csv', { labId: team.lab.id })).body
      .data.id
    expect((await deleteAs(app, team.cookies.pi, `/api/v1/datasets/${byPi}`)).status).toBe(204)

    expect((await getAs(app, team.cookies.pi, '/api/v1/datasets?deleted=true')).status).toBe(403)
    const deleted = await getAs(app, admin, '/api/v1/datasets?deleted=true')
    expect(deleted.body.data.map((d: { id: number }) => d.id)).toEqual(expect.arrayContaining([mine, byPi]))
    expect((await postAs(app, team.cookies.pi, `/api/v1/datasets/${mine}/restore`)).status).toBe(403)
    const restored = await postAs(app, admin, `/api/v1/datasets/${mine}/restore`)
    expect(restored.status).toBe(200)
    expect(restored.body.data.deletedAt).toBeNull()
    const back = await getAs(app, team.cookies.scientist, `/api/v1/datasets/${mine}/versions/1/rows`)
    expect(back.status).toBe(200)
    expect(back.body.data.total).toBe(40)
  })
})

describe('projects', () => {
  it('are created by scientists and PIs, listed for members, unique per lab, 404 outside', async () => {
    const created = await postAs(app, team.cookies.pi, '/api/v1/projects', {
      labId: team.lab.id,
      name: 'Dose finding',
      description: 'Three doses of NW-117',
    })
    expect(created.status).toBe(201)
    expect(created.body.data).toMatchObject({ labId: team.lab.id, name: 'Dose finding', datasetCount: 0 })
    expect(
      (
        await postAs(app, team.cookies.scientist, '/api/v1/projects', {
          labId: team.lab.id,
          name: 'Dose finding',
        })
      ).status,
    ).toBe(409)
    const list = await getAs(app, team.cookies.biostatistician, `/api/v1/projects?labId=${team.lab.id}`)
    expect(list.body.data.map((p: { name: string }) => p.name)).toEqual(
      expect.arrayContaining(['Dose finding', 'Neurite outgrowth']),
    )
    expect((await getAs(app, outsider, `/api/v1/projects?labId=${team.lab.id}`)).body.data).toEqual([])
    expect(
      (await patchAs(app, outsider, `/api/v1/projects/${created.body.data.id}`, { name: 'x' })).status,
    ).toBe(404)
    const renamed = await patchAs(app, team.cookies.scientist, `/api/v1/projects/${created.body.data.id}`, {
      name: 'Dose finding 2026',
    })
    expect(renamed.body.data.name).toBe('Dose finding 2026')
    const upload = await uploadDataset(app, team.cookies.scientist, csv, 'dose.csv', {
      labId: team.lab.id,
      projectId: created.body.data.id,
    })
    expect(upload.body.data.project).toEqual({ id: created.body.data.id, name: 'Dose finding 2026' })
    expect(
      (
        await uploadDataset(app, outsider, csv, 'dose.csv', {
          labId: team.lab.id,
          projectId: created.body.data.id,
        })
      ).status,
    ).toBe(404)
  })
})
