import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { fakeFetch } from '@/testing/fake-fetch'
import {
  dataset,
  datasetDetail,
  exclusion,
  neuriteDesign,
  project,
  tagging,
  versionDetail,
  versionSummary,
} from '@/testing/datasets'
import { useDatasetsStore } from './datasets'

const ok = (data: unknown) => ({ status: 200, body: { data } })
const v1 = '/api/v1/datasets/1/versions/1'

beforeEach(() => setActivePinia(createPinia()))
afterEach(() => vi.unstubAllGlobals())

describe('useDatasetsStore', () => {
  it('opens a dataset on its newest version, with the saved design', async () => {
    const fake = fakeFetch({
      'GET /api/v1/datasets/1': ok(datasetDetail()),
      [`GET ${v1}`]: ok(versionDetail({ tagging: tagging() })),
      [`GET ${v1}/design`]: ok(neuriteDesign),
    })
    vi.stubGlobal('fetch', fake.fetch)
    const store = useDatasetsStore()
    await store.open(1)
    expect(store.current?.name).toBe('Three-lab neurites')
    expect(store.version?.versionNo).toBe(1)
    expect(store.design).toEqual(neuriteDesign)
    expect(store.isLatestVersion).toBe(true)
  })

  it('asks for no design while the version has no saved nesting', async () => {
    const fake = fakeFetch({
      'GET /api/v1/datasets/1': ok(datasetDetail()),
      [`GET ${v1}`]: ok(versionDetail()),
    })
    vi.stubGlobal('fetch', fake.fetch)
    const store = useDatasetsStore()
    await store.open(1)
    expect(store.design).toBeNull()
    expect(fake.calls.map((c) => c.path)).toEqual(['/api/v1/datasets/1', v1])
  })

  it('keeps a missing dataset as a 404 error', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'GET /api/v1/datasets/5': {
          status: 404,
          body: { error: { code: 'NOT_FOUND', message: 'Dataset not found.' } },
        },
      }).fetch,
    )
    const store = useDatasetsStore()
    await store.open(5)
    expect(store.currentError?.status).toBe(404)
    expect(store.current).toBeNull()
  })

  it('drops the answer of an earlier open when a later one was asked for', async () => {
    let releaseFirst!: () => void
    const first = new Promise<void>((resolve) => (releaseFirst = resolve))
    const two = datasetDetail({ id: 2, name: 'Dose series', latestVersion: null, versions: [] })
    vi.stubGlobal('fetch', async (input: RequestInfo | URL) => {
      const path = String(input)
      if (path === '/api/v1/datasets/1') await first
      const body = path === '/api/v1/datasets/1' ? datasetDetail() : two
      return new Response(JSON.stringify({ data: body }), { status: 200 })
    })
    const store = useDatasetsStore()
    const slow = store.open(1)
    await store.open(2)
    releaseFirst()
    await slow
    expect(store.current?.name).toBe('Dose series')
  })

  it('saves a nesting and shows its design at once', async () => {
    const saved = tagging()
    const fake = fakeFetch({
      'GET /api/v1/datasets/1': ok(datasetDetail()),
      [`GET ${v1}`]: ok(versionDetail()),
      [`PUT ${v1}/tagging`]: ok({ tagging: saved, design: neuriteDesign }),
    })
    vi.stubGlobal('fetch', fake.fetch)
    const store = useDatasetsStore()
    await store.open(1)
    const input = {
      responseColumns: ['neurite_length_um'],
      conditionColumn: 'condition',
      levels: ['lab', 'mouse'],
    }
    await expect(store.saveTagging(input)).resolves.toBe(true)
    expect(store.version?.tagging).toEqual(saved)
    expect(store.design).toEqual(neuriteDesign)
    expect(store.taggingError).toBeNull()
  })

  it('keeps the server’s refusal of a nesting for the editor to show', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'GET /api/v1/datasets/1': ok(datasetDetail()),
        [`GET ${v1}`]: ok(versionDetail()),
        [`PUT ${v1}/tagging`]: {
          status: 422,
          body: { error: { code: 'UNPROCESSABLE', message: '“lab” does not split “mouse”.' } },
        },
      }).fetch,
    )
    const store = useDatasetsStore()
    await store.open(1)
    await expect(
      store.saveTagging({ responseColumns: ['x'], conditionColumn: null, levels: ['lab'] }),
    ).resolves.toBe(false)
    expect(store.taggingError?.message).toBe('“lab” does not split “mouse”.')
  })

  it('reloads counts after leaving rows out', async () => {
    let excluded = false
    vi.stubGlobal('fetch', async (input: RequestInfo | URL, init: RequestInit = {}) => {
      const key = `${init.method ?? 'GET'} ${String(input)}`
      if (key === `POST ${v1}/exclusions`) excluded = true
      const body =
        key === 'GET /api/v1/datasets/1'
          ? datasetDetail()
          : key === `GET ${v1}`
            ? versionDetail(excluded ? { excludedRowCount: 4, exclusions: [exclusion()] } : {})
            : exclusion()
      return new Response(JSON.stringify({ data: body }), { status: key.startsWith('POST') ? 201 : 200 })
    })
    const store = useDatasetsStore()
    await store.open(1)
    const added = await store.addExclusion({
      kind: 'rule',
      rule: { column: 'neurite_length_um', operator: 'gt', value: '100' },
      reason: 'Two neurites traced as one',
    })
    expect(added).toBe(true)
    expect(store.version?.excludedRowCount).toBe(4)
    expect(store.version?.exclusions).toHaveLength(1)
  })

  it('lists datasets even when the projects cannot be loaded', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'GET /api/v1/datasets': ok([dataset()]),
        'GET /api/v1/projects': { status: 500, body: { error: { code: 'INTERNAL', message: 'Boom.' } } },
      }).fetch,
    )
    const store = useDatasetsStore()
    await store.loadList()
    expect(store.list).toHaveLength(1)
    expect(store.listError).toBeNull()
    expect(store.projectsError?.message).toBe('Boom.')
  })

  it('deletes the open dataset and forgets it in the list', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'GET /api/v1/datasets': ok([dataset(), dataset({ id: 2 })]),
        'GET /api/v1/projects': ok([project()]),
        'GET /api/v1/datasets/1': ok(datasetDetail({ latestVersion: null })),
        'DELETE /api/v1/datasets/1': { status: 204 },
      }).fetch,
    )
    const store = useDatasetsStore()
    await store.loadList()
    await store.open(1)
    await expect(store.remove()).resolves.toBe(true)
    expect(store.list.map((d) => d.id)).toEqual([2])
    expect(store.current).toBeNull()
  })

  it('lets an admin restore a deleted dataset', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'GET /api/v1/datasets?deleted=true': ok([dataset({ deletedAt: '2026-12-02T10:00:00Z' })]),
        'POST /api/v1/datasets/1/restore': ok(dataset()),
      }).fetch,
    )
    const store = useDatasetsStore()
    await store.loadDeleted()
    expect(store.deleted).toHaveLength(1)
    await expect(store.restore(1)).resolves.toBe(true)
    expect(store.deleted).toEqual([])
  })

  it('shows a version uploaded from the dataset page', async () => {
    vi.stubGlobal(
      'fetch',
      fakeFetch({
        'GET /api/v1/datasets/1': ok(
          datasetDetail({
            latestVersion: versionSummary({ id: 2, versionNo: 2 }),
            versions: [versionSummary()],
          }),
        ),
        [`GET /api/v1/datasets/1/versions/2`]: ok(versionDetail({ id: 2, versionNo: 2 })),
      }).fetch,
    )
    const store = useDatasetsStore()
    await store.open(1)
    await store.showUploadedVersion(versionDetail({ id: 3, versionNo: 3 }))
    expect(store.version?.versionNo).toBe(3)
  })
})
