import request from 'supertest'
import type { Express } from 'express'
import { afterAll } from 'vitest'
import { appWriteHeaders, closeConnections, createTestApp, signIn } from '../support/api'
import { createLabWithTeam } from '../support/factories'

/**
 * The start of a dataset test file: one app for the whole file, the database pools closed after
 * it, and the small cell table ready to upload. Call it at the top level of the file.
 */
export function datasetsTestApp(): { app: Express; csv: Buffer } {
  afterAll(closeConnections)
  return { app: createTestApp(), csv: Buffer.from(smallCellTable()) }
}

/** A fresh lab with a PI, a scientist and a biostatistician, each signed in. */
export async function signedInTeam(app: Express) {
  const team = await createLabWithTeam()
  const [pi, scientist, biostatistician] = await Promise.all([
    signIn(app, team.pi.email, team.pi.password),
    signIn(app, team.scientist.email, team.scientist.password),
    signIn(app, team.biostatistician.email, team.biostatistician.password),
  ])
  return { ...team, cookies: { pi, scientist, biostatistician } }
}

export type SignedInTeam = Awaited<ReturnType<typeof signedInTeam>>

export interface UploadSpec {
  labId?: number
  projectName?: string
  projectId?: number
  name?: string
  sheet?: string
  token?: string
}

/** POST /api/v1/datasets as the browser sends it: text fields first, then the file. */
export function uploadDataset(
  app: Express,
  cookie: string,
  file: Buffer,
  filename: string,
  spec: UploadSpec = {},
) {
  const req = request(app).post('/api/v1/datasets').set(appWriteHeaders).set('Cookie', cookie)
  if (spec.token) req.set('X-Upload-Token', spec.token)
  if (spec.labId !== undefined) req.field('labId', String(spec.labId))
  if (spec.projectId !== undefined) req.field('projectId', String(spec.projectId))
  else req.field('projectName', spec.projectName ?? 'Neurite outgrowth')
  if (spec.name) req.field('name', spec.name)
  if (spec.sheet) req.field('sheet', spec.sheet)
  return req.attach('file', file, filename)
}

export function uploadVersion(
  app: Express,
  cookie: string,
  datasetId: number,
  file: Buffer,
  filename: string,
  sheet?: string,
) {
  const req = request(app)
    .post(`/api/v1/datasets/${datasetId}/versions`)
    .set(appWriteHeaders)
    .set('Cookie', cookie)
  if (sheet) req.field('sheet', sheet)
  return req.attach('file', file, filename)
}

export const getAs = (app: Express, cookie: string, path: string) =>
  request(app).get(path).set('Cookie', cookie)
export const putAs = (app: Express, cookie: string, path: string, body: object) =>
  request(app).put(path).set(appWriteHeaders).set('Cookie', cookie).send(body)
export const postAs = (app: Express, cookie: string, path: string, body: object = {}) =>
  request(app).post(path).set(appWriteHeaders).set('Cookie', cookie).send(body)
export const patchAs = (app: Express, cookie: string, path: string, body: object) =>
  request(app).patch(path).set(appWriteHeaders).set('Cookie', cookie).send(body)
export const deleteAs = (app: Express, cookie: string, path: string) =>
  request(app).delete(path).set(appWriteHeaders).set('Cookie', cookie)

/** A small invented per-cell table: 2 labs × 4 mice (labels reused), treatment per mouse, 5 cells each. */
export function smallCellTable(
  options: { delimiter?: string; decimalComma?: boolean; eol?: string } = {},
): string {
  const d = options.delimiter ?? ','
  const eol = options.eol ?? '\n'
  const lines = [['lab', 'mouse', 'treatment', 'cell', 'neurite_length_um'].join(d)]
  let k = 0
  for (const lab of ['Nimbus', 'Fernhill'])
    for (let m = 1; m <= 4; m++)
      for (let c = 1; c <= 5; c++) {
        const value = (100 + ((k++ * 37) % 50) + 0.25).toFixed(2)
        lines.push(
          [
            lab,
            `m${m}`,
            m % 2 ? 'vehicle' : 'NW-117',
            String(c),
            options.decimalComma ? value.replace('.', ',') : value,
          ].join(d),
        )
      }
  return lines.join(eol) + eol
}
