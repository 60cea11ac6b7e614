import { createHash } from 'node:crypto'
import { mkdtempSync, rmSync, writeFileSync, existsSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { useOriginalStore } from '../../server/originals'
import { startFakeS3, type RunningFakeS3 } from '../../server/originals/fake-s3-server'
import { FAKE_S3_CREDENTIALS } from '../../server/originals/originals-config'
import { s3Store } from '../../server/originals/s3-store'
import type { OriginalStore } from '../../server/originals/original-store'
import { sweepDatasetLeftovers } from '../../server/services/datasets-upload.service'
import { closeConnections } from '../support/api'
import { datasetsTestApp, getAs, signedInTeam, uploadDataset, type SignedInTeam } from './datasets-support'

// Originals in an S3 bucket (ORIGINALS_STORE=s3), against the local fake (s3rver) on loopback.
const { app, csv } = datasetsTestApp()
const folder = mkdtempSync(join(tmpdir(), 'nestwise-s3-'))
let fake: RunningFakeS3
let store: OriginalStore
let team: SignedInTeam
const settings = (endpoint: string, prefix: string) => ({
  endpoint,
  bucket: 'nestwise-test-originals',
  region: 'us-east-1',
  forcePathStyle: true,
  prefix,
  credentials: FAKE_S3_CREDENTIALS,
})

beforeAll(async () => {
  fake = await startFakeS3({ port: 0, dir: join(folder, 'bucket'), bucket: 'nestwise-test-originals' })
  store = s3Store(settings(fake.endpoint, `run-${process.pid}/`))
  useOriginalStore(store)
  team = await signedInTeam(app)
})

afterAll(async () => {
  useOriginalStore(null)
  await fake.close()
  rmSync(folder, { recursive: true, force: true })
  await closeConnections()
})

const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex')

function tempFile(bytes: Buffer): string {
  const path = join(folder, `upload-${Math.random().toString(36).slice(2)}`)
  writeFileSync(path, bytes)
  return path
}

async function readAll(stream: NodeJS.ReadableStream): Promise<Buffer> {
  const chunks: Buffer[] = []
  for await (const chunk of stream) chunks.push(chunk as Buffer)
  return Buffer.concat(chunks)
}

describe('the S3 store', () => {
  it('keeps a file under its SHA-256, streams it back, and forgets it', async () => {
    const bytes = Buffer.from('lab,mouse,y\nNimbus,m01,1.5\n')
    const path = tempFile(bytes)
    await store.keep(path, sha256(bytes))
    expect(existsSync(path)).toBe(false)
    expect(await store.exists(sha256(bytes))).toBe(true)
    const opened = (await store.open(sha256(bytes)))!
    expect(opened.size).toBe(bytes.length)
    expect(Buffer.compare(await readAll(opened.stream), bytes)).toBe(0)
    await store.discard(sha256(bytes))
    expect(await store.exists(sha256(bytes))).toBe(false)
    expect(await store.open(sha256(bytes))).toBeNull()
  })

  it('lists only its own prefix when asked for stale originals', async () => {
    const other = s3Store(settings(fake.endpoint, 'another-database/'))
    const bytes = Buffer.from('only in the other prefix\n')
    await other.keep(tempFile(bytes), sha256(bytes))
    const mine = Buffer.from('mine\n')
    await store.keep(tempFile(mine), sha256(mine))
    // Everything is younger than a second ago…
    expect(await store.staleHashes(60_000)).toEqual([])
    // …and older than "a moment from now".
    expect(await store.staleHashes(-60_000)).toEqual([sha256(mine)])
    expect(await other.staleHashes(-60_000)).toEqual([sha256(bytes)])
  })

  it('fails loudly, not silently, when the bucket does not exist', async () => {
    const wrong = s3Store({ ...settings(fake.endpoint, 'x/'), bucket: 'no-such-bucket' })
    const bytes = Buffer.from('x\n')
    await expect(wrong.keep(tempFile(bytes), sha256(bytes))).rejects.toThrow(/bucket/i)
  })
})

describe('uploads and downloads through the app with ORIGINALS_STORE=s3', () => {
  it('stores the upload in the bucket and streams it back byte for byte', async () => {
    const res = await uploadDataset(app, team.cookies.scientist, csv, 'bucket.csv', { labId: team.lab.id })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const sha = res.body.data.latestVersion.sha256
    expect(sha).toBe(sha256(csv))
    expect(await store.exists(sha)).toBe(true)
    const original = await getAs(
      app,
      team.cookies.scientist,
      `/api/v1/datasets/${res.body.data.id}/versions/1/original`,
    )
      .buffer(true)
      .parse((r, done) => {
        const chunks: Buffer[] = []
        r.on('data', (c: Buffer) => chunks.push(c))
        r.on('end', () => done(null, Buffer.concat(chunks)))
      })
    expect(original.status).toBe(200)
    expect(original.headers['content-disposition']).toContain('bucket.csv')
    expect(original.headers['content-length']).toBe(String(csv.length))
    expect(Buffer.compare(original.body as Buffer, csv)).toBe(0)
  })

  it('answers 404 naming the store when the object is gone', async () => {
    const res = await uploadDataset(
      app,
      team.cookies.scientist,
      Buffer.concat([csv, Buffer.from('\n')]),
      'gone.csv',
      {
        labId: team.lab.id,
      },
    )
    await store.discard(res.body.data.latestVersion.sha256)
    const original = await getAs(
      app,
      team.cookies.scientist,
      `/api/v1/datasets/${res.body.data.id}/versions/1/original`,
    )
    expect(original.status).toBe(404)
    expect(original.body.error.message).toMatch(/missing from the store/)
  })

  it('sweeps unreferenced objects older than an hour and keeps referenced ones', async () => {
    const orphan = Buffer.from('nobody refers to this\n')
    await store.keep(tempFile(orphan), sha256(orphan))
    // Young objects stay whether referenced or not.
    expect((await sweepDatasetLeftovers()).originals).toBe(0)
    expect(await store.exists(sha256(orphan))).toBe(true)
    // As seen an hour later (the store's clock moved on): the orphan goes, the upload's object stays.
    const later = { ...store, staleHashes: () => store.staleHashes(-2 * 60 * 60 * 1000) }
    useOriginalStore(later)
    try {
      expect((await sweepDatasetLeftovers()).originals).toBeGreaterThanOrEqual(1)
    } finally {
      useOriginalStore(store)
    }
    expect(await store.exists(sha256(orphan))).toBe(false)
    expect(await store.exists(sha256(csv))).toBe(true)
  })
})
