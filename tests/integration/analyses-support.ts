import type { Express } from 'express'
import seedrandom from 'seedrandom'
import { expect } from 'vitest'
import { finishQueuedVersion } from '../support/finished-version'
import { getAs, postAs, putAs, uploadDataset } from './datasets-support'

export interface NeuriteSpec {
  seed?: string
  labs?: string[]
  /** Mice per lab; odd-numbered mice get vehicle, even ones the invented compound NW-117. */
  mice?: number
  minCells?: number
  maxCells?: number
  /** SD of the mouse effect and of the neurons within a mouse (µm). */
  mouseSd?: number
  cellSd?: number
  effect?: number
  /** Mouse labels, when the test needs special ones (default m01, m02, …). */
  mouseLabel?: (m: number) => string
}

/** An invented per-neuron table: lab, mouse, treatment, neuron, neurite_length_um. Seeded. */
export function neuriteCsv(spec: NeuriteSpec = {}): string {
  const random = seedrandom(spec.seed ?? 'analyses-test')
  const normal = () => {
    let u = 0
    while (u === 0) u = random()
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random())
  }
  const labs = spec.labs ?? ['Nimbus']
  const mice = spec.mice ?? 10
  const minCells = spec.minCells ?? 20
  const maxCells = spec.maxCells ?? 60
  const label = spec.mouseLabel ?? ((m: number) => `m${String(m).padStart(2, '0')}`)
  const lines = ['lab,mouse,treatment,neuron,neurite_length_um']
  for (const lab of labs)
    for (let m = 1; m <= mice; m++) {
      const treated = m % 2 === 0
      const mouseMean = 120 + (treated ? (spec.effect ?? 4) : 0) + (spec.mouseSd ?? 10) * normal()
      const cells = minCells + Math.floor(random() * (maxCells - minCells + 1))
      for (let c = 1; c <= cells; c++) {
        const y = mouseMean + (spec.cellSd ?? 15) * normal()
        const quoted = (text: string) => (/[",\n]/.test(text) ? `"${text.replaceAll('"', '""')}"` : text)
        lines.push([quoted(lab), quoted(label(m)), treated ? 'NW-117' : 'vehicle', c, y.toFixed(2)].join(','))
      }
    }
  return lines.join('\n') + '\n'
}

/** Uploads a table and tags it (response neurite_length_um, condition treatment, the given levels). */
export async function taggedDataset(
  app: Express,
  cookie: string,
  labId: number,
  csv: string,
  levels: string[] = ['mouse'],
  name?: string,
) {
  const upload = await uploadDataset(app, cookie, Buffer.from(csv), `${name ?? 'neurites'}.csv`, {
    labId,
    name,
  })
  expect(upload.status, JSON.stringify(upload.body)).toBe(201)
  const dataset = upload.body.data as { id: number; latestVersion: { sha256: string; id: number } }
  const tag = await putAs(app, cookie, `/api/v1/datasets/${dataset.id}/versions/1/tagging`, {
    responseColumns: ['neurite_length_um'],
    conditionColumn: 'treatment',
    levels,
  })
  expect(tag.status, JSON.stringify(tag.body)).toBe(200)
  return dataset
}

export interface PolledStatus {
  status: string
  progress: { stage: string; fraction: number }
}

/** Polls a version's status until it is done or failed; returns every distinct state seen on the way. */
export async function pollUntilFinished(
  app: Express,
  cookie: string,
  analysisId: number,
  versionNo: number,
  timeoutMs = 60_000,
) {
  const seen: PolledStatus[] = []
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const res = await getAs(app, cookie, `/api/v1/analyses/${analysisId}/versions/${versionNo}/status`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const state: PolledStatus = { status: res.body.data.status, progress: res.body.data.progress }
    const last = seen.at(-1)
    if (!last || last.status !== state.status || last.progress.stage !== state.progress.stage)
      seen.push(state)
    if (state.status === 'done' || state.status === 'failed') return { final: res.body.data, seen }
    if (Date.now() > deadline)
      throw new Error(
        `version ${versionNo} of analysis ${analysisId} still ${state.status} after ${timeoutMs} ms`,
      )
    await new Promise((resolve) => setTimeout(resolve, 15))
  }
}

/** Creates an analysis of a tagged dataset and finishes its first version in the test process. */
export async function finishedAnalysis(app: Express, cookie: string, datasetId: number, name: string) {
  const res = await postAs(app, cookie, '/api/v1/analyses', { datasetId, name })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  await finishQueuedVersion(res.body.data.id)
  return res.body.data.id as number
}

export interface TwoFactorSpec {
  seed?: string
  /** Data row (1-based) whose soma area is written as text, as a spreadsheet export might. */
  textSomaAtRow?: number
  /** Adds an `ear_tag` column: each mouse's own label (a level's units under another name). */
  earTags?: boolean
}

/**
 * An invented genotype × treatment table: 2 labs × 6 mice (WT and the invented line KO-3
 * alternating), two coverslips per mouse (vehicle and NW-117), 8 neurons per coverslip. Besides the
 * design columns: "batch", the same in every row, and "line", which is the genotype under other
 * names (line-A for WT, line-B for KO-3); soma_area_um2 per neuron. Seeded.
 */
export function twoFactorCsv(spec: TwoFactorSpec = {}): string {
  const random = seedrandom(spec.seed ?? 'two-factors')
  const normal = () => {
    let u = 0
    while (u === 0) u = random()
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random())
  }
  const header = 'lab,mouse,genotype,line,batch,coverslip,treatment,neuron,soma_area_um2,neurite_length_um'
  const lines = [spec.earTags ? `${header},ear_tag` : header]
  let row = 0
  for (const lab of ['Nimbus', 'Fernhill'])
    for (let m = 1; m <= 6; m++) {
      const knockout = m % 2 === 0
      const mouseMean = 120 + (knockout ? -10 : 0) + 8 * normal()
      for (const [c, treatment] of ['vehicle', 'NW-117'].entries())
        for (let n = 1; n <= 8; n++) {
          row++
          const soma = 85 + 10 * normal()
          const y = mouseMean + (treatment === 'NW-117' ? 6 : 0) + 0.4 * (soma - 85) + 15 * normal()
          lines.push(
            [
              lab,
              `m${m}`,
              knockout ? 'KO-3' : 'WT',
              knockout ? 'line-B' : 'line-A',
              'B1',
              `cs${c + 1}`,
              treatment,
              n,
              row === spec.textSomaAtRow ? 'n.d.' : soma.toFixed(1),
              y.toFixed(2),
              ...(spec.earTags ? [`${lab.slice(0, 2)}-${m}`] : []),
            ].join(','),
          )
        }
    }
  return lines.join('\n') + '\n'
}
