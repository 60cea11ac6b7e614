// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import {
  AnalysisSettings,
  type AnalysisDetail,
  type AnalysisVersionDetail,
} from '../../shared/schemas/analyses'
import { AnalysisResult } from '../../shared/schemas/analysis-result'
import demo from '../../shared/report/fixtures/single-lab-demo.json'
import { fakeFetch } from '@/testing/fake-fetch'
import { mountWithApp } from '@/testing/mount-with-app'
import { samiScientist } from '@/testing/users'
import { ERROR_BAR_STORAGE_KEY } from '@/stores/display-preferences'
import { formatDate } from '@/formatting/dates'
import type { ReviewState } from '../../shared/schemas/reviews'
import AnalysisPrintView from './AnalysisPrintView.vue'

// Fixture: the stored engine-0.1.0 result of the seeded single-lab demo; the analysis around it is invented.
const result = AnalysisResult.parse(demo.result)
const person = { id: samiScientist.id, name: samiScientist.name }
const summary = {
  id: 11,
  analysisId: 1,
  versionNo: 1,
  status: 'done' as const,
  progress: { stage: 'done' as const, fraction: 1 },
  error: null,
  createdAt: '2025-01-01T00:00:00.000Z',
  startedAt: null,
  finishedAt: '2025-01-01T00:00:01.000Z',
  runMs: 900,
  datasetVersion: { id: 3, versionNo: 1, sha256: 'a'.repeat(64) },
  settings: AnalysisSettings.parse(demo.settings),
  exclusions: [],
  engineVersion: '0.1.0',
  createdBy: person,
}
const version: AnalysisVersionDetail = { ...summary, result, chart: null }
const analysis: AnalysisDetail = {
  id: 1,
  labId: 1,
  labName: 'Nimbus Neurite Lab',
  project: { id: 1, name: 'Neurite pilot' },
  dataset: { id: 1, name: 'Single lab' },
  name: 'Neurite length',
  createdBy: person,
  createdAt: summary.createdAt,
  updatedAt: summary.createdAt,
  versionCount: 1,
  latestVersion: {
    versionNo: 1,
    status: 'done',
    progress: summary.progress,
    finishedAt: null,
    headline: null,
  },
  versions: [summary],
  permissions: { run: true, rename: true },
}

const ok = (data: unknown) => ({ status: 200, body: { data } })

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

// An invented sign-off of version 1 by an invented biostatistician.
const signedAt = '2025-01-02T10:30:00.000Z'
const signedReview: ReviewState = {
  signOff: {
    signedOff: true,
    coveringSignOff: {
      id: 5,
      versionNo: 1,
      signedBy: { id: 9, name: 'Bea Biostat' },
      signedAt,
      hash: 'b'.repeat(64),
      hashValid: true,
    },
    earlierSignOffs: [],
    tampered: [],
  },
  fingerprint: 'b'.repeat(64),
  requests: [],
  comments: [],
  reviewers: [],
  permissions: { requestReview: false, comment: false },
}

async function openPrint(path: string, review?: ReviewState) {
  vi.stubGlobal(
    'fetch',
    fakeFetch({
      ...(review ? { 'GET /api/v1/analyses/1/versions/1/review': ok(review) } : {}),
      'GET /api/v1/auth/session': ok(samiScientist),
      'GET /api/v1/analyses/1': ok(analysis),
      'GET /api/v1/analyses/1/versions/1': ok(version),
      'GET /api/v1/plans?analysisId=1&versionNo=1': ok([]),
    }).fetch,
  )
  const { wrapper } = await mountWithApp(AnalysisPrintView, { path, stubs: { AnalysisChart: true } })
  return wrapper
}

describe('AnalysisPrintView', () => {
  it('prints the error bar that ?bars= names, and says which', async () => {
    const wrapper = await openPrint('/analyses/1/versions/1/print?bars=sd')
    expect(wrapper.get('[data-testid="print-error-bars"]').text()).toBe(
      'Error bars in the chart: SD (mean ± standard deviation)',
    )
  })

  it('falls back to the viewer’s remembered choice without ?bars= (or with one it does not know)', async () => {
    localStorage.setItem(ERROR_BAR_STORAGE_KEY, 'ci95')
    const wrapper = await openPrint('/analyses/1/versions/1/print?bars=whiskers')
    expect(wrapper.get('[data-testid="print-error-bars"]').text()).toContain('95% CI')
    localStorage.removeItem(ERROR_BAR_STORAGE_KEY)
  })

  it('names who signed the version off, and when, in the printed header', async () => {
    const wrapper = await openPrint('/analyses/1/versions/1/print', signedReview)
    const chip = wrapper.get('header [data-testid="sign-off-chip"]')
    expect(chip.text()).toBe(`Signed off by Bea Biostat, on ${formatDate(signedAt)}`)
  })
})
