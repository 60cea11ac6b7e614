import { afterEach, describe, expect, it, vi } from 'vitest'
import { UPLOAD_TOKEN_HEADER as sharedHeader, UploadTokenParams } from '../../shared/schemas/datasets'
import { fakeFetch } from '@/testing/fake-fetch'
import {
  UPLOAD_TOKEN_HEADER,
  getRows,
  listDatasets,
  newUploadToken,
  originalFileUrl,
  saveTagging,
} from './datasets'

afterEach(() => vi.unstubAllGlobals())

describe('datasets API module', () => {
  it('uses the upload token header and token format the server expects', () => {
    expect(UPLOAD_TOKEN_HEADER).toBe(sharedHeader)
    const token = newUploadToken()
    expect(UploadTokenParams.safeParse({ token }).success).toBe(true)
    expect(newUploadToken()).not.toBe(token)
  })

  it('asks for deleted datasets only when told to', async () => {
    const fake = fakeFetch({
      'GET /api/v1/datasets': { status: 200, body: { data: [] } },
      'GET /api/v1/datasets?deleted=true': { status: 200, body: { data: [] } },
      'GET /api/v1/datasets?labId=2': { status: 200, body: { data: [] } },
    })
    vi.stubGlobal('fetch', fake.fetch)
    await listDatasets()
    await listDatasets({ deleted: true })
    await listDatasets({ labId: 2, deleted: false })
    expect(fake.calls.map((c) => c.path)).toEqual([
      '/api/v1/datasets',
      '/api/v1/datasets?deleted=true',
      '/api/v1/datasets?labId=2',
    ])
  })

  it('sends paging, sorting and the row filter as query parameters', async () => {
    const path =
      '/api/v1/datasets/4/versions/2/rows?page=3&pageSize=50&sortBy=neurite+length+%28%C2%B5m%29&sortDesc=true'
    const fake = fakeFetch({ [`GET ${path}`]: { status: 200, body: { data: { rows: [] } } } })
    vi.stubGlobal('fetch', fake.fetch)
    await getRows(4, 2, { page: 3, pageSize: 50, sortBy: 'neurite length (µm)', sortDesc: true })
    expect(fake.calls).toHaveLength(1)
  })

  it('saves a nesting with PUT', async () => {
    const fake = fakeFetch({
      'PUT /api/v1/datasets/4/versions/1/tagging': {
        status: 200,
        body: { data: { tagging: {}, design: {} } },
      },
    })
    vi.stubGlobal('fetch', fake.fetch)
    const input = { responseColumns: ['neurite_length_um'], conditionColumn: null, levels: ['mouse'] }
    await saveTagging(4, 1, input)
    expect(JSON.parse(String(fake.calls[0].init.body))).toEqual(input)
  })

  it('points at the original file of a version', () => {
    expect(originalFileUrl(4, 2)).toBe('/api/v1/datasets/4/versions/2/original')
  })
})
