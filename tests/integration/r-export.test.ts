import { spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { AnalysisResult } from '../../shared/schemas/analysis-result'
import { rCoefficientNames, rComponentGroups } from '../../server/analysis/r-script'
import { finishQueuedVersion } from '../support/finished-version'
import { closeConnections, createTestApp } from '../support/api'
import { inventedNeuronCsv } from '../../shared/analysis/fixtures/invented-glmm-tables'
import { neuriteCsv, taggedDataset, twoFactorCsv } from './analyses-support'
import { getAs, postAs, putAs, signedInTeam, uploadDataset } from './datasets-support'

/**
 * "Check it in R": the exported script is run with Rscript on the exported rows, and what R finds
 * is compared with the result Nestwise stored. Agreement required, as in the live reference check
 * (tests/reference/lmer-reference.test.ts) and for the same reason: both fits maximise the same
 * REML criterion, the script tightens lme4's optimiser tolerances, so variance components,
 * coefficients and SEs agree to 1e-4 relative (1e-6 absolute near zero, where a relative
 * difference means nothing); Satterthwaite df to 1e-3, the precision of lmerTest's numerical
 * derivatives. Binary and count responses are refitted with glmer: the same tolerances as the live
 * reference check (tests/reference/glmer-reference.test.ts), z instead of df. Skips, loudly, only
 * when Rscript is not installed.
 */
const app = createTestApp()
const REL_TOL = 1e-4
const DF_TOL = 1e-3
const ABS_TOL = 1e-6
/** glmer: its SEs come from a finite-difference Hessian, good to about 1e-4; the live reference check allows 1e-3. */
const GLMM_TOL = 1e-3

const rscript = spawnSync('Rscript', ['--version'], { encoding: 'utf8' })
const hasR = rscript.status === 0
if (!hasR) console.warn('r-export: Rscript not found, running the exported script is SKIPPED.')

let team: Awaited<ReturnType<typeof signedInTeam>>
let folder: string

beforeAll(async () => {
  team = await signedInTeam(app)
  folder = mkdtempSync(join(tmpdir(), 'nestwise-r-export-'))
}, 60_000)

afterAll(async () => {
  rmSync(folder, { recursive: true, force: true })
  await closeConnections()
})

async function analysisOf(
  csv: string,
  levels: string[],
  settings: object,
  name: string,
  tag: (csv: string, name: string) => Promise<{ id: number }> = (text, title) =>
    taggedDataset(app, team.cookies.scientist, team.lab.id, text, levels, title),
) {
  const dataset = await tag(csv, name)
  const created = await postAs(app, team.cookies.scientist, '/api/v1/analyses', {
    datasetId: dataset.id,
    name,
    settings,
  })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  const id = created.body.data.id as number
  await finishQueuedVersion(id)
  const version = await getAs(app, team.cookies.biostatistician, `/api/v1/analyses/${id}/versions/1`)
  expect(version.body.data.status).toBe('done')
  return { id, result: version.body.data.result as AnalysisResult }
}

/** Downloads both files as a biostatistician would, runs the script, returns what R found. */
async function runExport(id: number) {
  const base = `/api/v1/analyses/${id}/versions/1/r`
  const script = await request(app).get(`${base}/script.R`).set('Cookie', team.cookies.biostatistician)
  const rows = await request(app)
    .get(`${base}/rows.csv`)
    .set('Cookie', team.cookies.biostatistician)
    .buffer(true)
    .parse((res, done) => {
      let text = ''
      res.setEncoding('utf8')
      res.on('data', (chunk: string) => (text += chunk))
      res.on('end', () => done(null, text))
    })
  expect(script.status).toBe(200)
  expect(rows.status).toBe(200)
  expect(rows.headers['content-type']).toMatch(/^text\/csv/)
  const scriptName = /filename="?([^";]+)"?/.exec(script.headers['content-disposition'])![1]
  const rowsName = /filename="?([^";]+)"?/.exec(rows.headers['content-disposition'])![1]
  expect(script.text).toContain(`read.csv("${rowsName}"`)
  const dir = mkdtempSync(join(folder, 'v-'))
  writeFileSync(join(dir, scriptName), script.text)
  writeFileSync(join(dir, rowsName), rows.body as string)
  const dump = [
    `invisible(capture.output(source(${JSON.stringify(scriptName)})))`,
    'vc <- as.data.frame(VarCorr(model)); co <- summary(model)$coefficients',
    'cat(jsonlite::toJSON(list(nObs = nobs(model), groups = vc$grp, variances = vc$vcov,',
    '  terms = rownames(co), estimate = unname(co[, "Estimate"]), se = unname(co[, "Std. Error"]),',
    '  df = if ("df" %in% colnames(co)) unname(co[, "df"]) else NULL,',
    '  z = if ("z value" %in% colnames(co)) unname(co[, "z value"]) else NULL), digits = NA, auto_unbox = TRUE))',
  ].join('\n')
  const run = spawnSync('Rscript', ['-e', dump], { cwd: dir, encoding: 'utf8', timeout: 120_000 })
  expect(run.status, run.stderr).toBe(0)
  return {
    script: script.text,
    rows: rows.body as string,
    r: JSON.parse(run.stdout) as {
      nObs: number
      groups: string[]
      variances: number[]
      terms: string[]
      estimate: number[]
      se: number[]
      df?: number[]
      z?: number[]
    },
  }
}

function agree(what: string, ours: number, theirs: number, tolerance = REL_TOL): void {
  const diff = Math.abs(ours - theirs)
  const rel = diff / Math.max(Math.abs(ours), Math.abs(theirs), 1e-300)
  expect(
    diff <= ABS_TOL || rel <= tolerance,
    `${what}: Nestwise ${ours}, R ${theirs} (relative ${rel})`,
  ).toBe(true)
}

/** Every stored variance component and coefficient against R's refit of the exported files. */
function compare(result: AnalysisResult, r: Awaited<ReturnType<typeof runExport>>['r']): void {
  expect(r.nObs).toBe(result.nObs)
  const glmm = result.family !== undefined && result.family !== 'gaussian'
  const tolerance = glmm ? GLMM_TOL : REL_TOL
  const groups = rComponentGroups(result)
  result.varianceComponents.forEach((c, i) => {
    // The latent residual of a binary or count model is fixed by its family, not fitted (glmer has none).
    if (glmm && groups[i] === 'Residual') return
    const at = r.groups.indexOf(groups[i])
    expect(at, `R has the component ${groups[i]}`).toBeGreaterThanOrEqual(0)
    agree(`variance ${groups[i]}`, c.variance, r.variances[at], tolerance)
  })
  const coefficients = result.comparisons.mixedModel!.coefficients!
  const names = rCoefficientNames(result)
  expect(names).toEqual(r.terms)
  coefficients.forEach((c, i) => {
    agree(`estimate ${names[i]}`, c.estimate, r.estimate[i], tolerance)
    agree(`SE ${names[i]}`, c.se, r.se[i], tolerance)
    if ('df' in c) agree(`df ${names[i]}`, c.df, r.df![i], DF_TOL)
    else agree(`z ${names[i]}`, c.z, r.z![i], tolerance)
  })
}

describe.skipIf(!hasR)('the R export reproduces the stored result in lme4 + lmerTest', () => {
  it('two labs, a lab × treatment term and a mouse level (invented neurite table)', async () => {
    const { id, result } = await analysisOf(
      neuriteCsv({ seed: 'r-export', labs: ['Nimbus', 'Fernhill', 'Larkspur'], mice: 8 }),
      ['lab', 'mouse'],
      { reference: { treatment: 'vehicle' } },
      'R export, three labs',
    )
    const { script, rows, r } = await runExport(id)
    expect(result.model!.formula).toContain('(1|lab:treatment)')
    expect(script).toContain(`lmer(${result.model!.formula}, data = d`)
    expect(script).toContain('factor(d[["treatment"]], levels = c("vehicle", "NW-117"))')
    // The header and one line per observation the analysis used.
    expect(rows.trimEnd().split('\n')).toHaveLength(result.nObs + 1)
    compare(result, r)
  }, 180_000)

  it('two factors, their interaction and a covariate, the reference levels not first in the file', async () => {
    const { id, result } = await analysisOf(
      twoFactorCsv({ seed: 'r-export-2' }),
      ['lab', 'mouse', 'coverslip'],
      {
        conditions: ['genotype', 'treatment'],
        covariates: ['soma_area_um2'],
        // KO-3 as the reference: R must be told, since it would sort "KO-3" first anyway only by luck of the alphabet.
        reference: { genotype: 'KO-3', treatment: 'vehicle' },
      },
      'R export, two factors',
    )
    const { script, r } = await runExport(id)
    expect(script).toContain('factor(d[["genotype"]], levels = c("KO-3", "WT"))')
    expect(script).toContain('d[["soma_area_um2"]] <- as.numeric(d[["soma_area_um2"]])')
    compare(result, r)
  }, 180_000)
})

/** The invented neuron table (invented-glmm-tables.ts), tagged with lab and mouse. */
async function neuronDataset(csv: string, name: string) {
  const upload = await uploadDataset(app, team.cookies.scientist, Buffer.from(csv), `${name}.csv`, {
    labId: team.lab.id,
    name,
  })
  expect(upload.status, JSON.stringify(upload.body)).toBe(201)
  const dataset = upload.body.data as { id: number }
  const tag = await putAs(app, team.cookies.scientist, `/api/v1/datasets/${dataset.id}/versions/1/tagging`, {
    responseColumns: ['puncta'],
    conditionColumn: 'treatment',
    levels: ['lab', 'mouse'],
  })
  expect(tag.status, JSON.stringify(tag.body)).toBe(200)
  return dataset
}

describe.skipIf(!hasR)('the R export of a binary or count response reproduces it in glmer', () => {
  it('a yes/no marker, its labels turned into 1 for the value counted as yes', async () => {
    const { id, result } = await analysisOf(
      inventedNeuronCsv(),
      ['lab', 'mouse'],
      { response: 'marker', family: 'binomial', positive: 'positive' },
      'R export, marker',
      neuronDataset,
    )
    const { script, rows, r } = await runExport(id)
    expect(script).toContain(`glmer(${result.model!.formula}, data = d, family = binomial(link = "logit")`)
    expect(script).toContain('1 = "positive", 0 = "negative"')
    expect(
      new Set(
        rows
          .trimEnd()
          .split('\n')
          .slice(1)
          .map((line) => line.split(',')[0]),
      ),
    ).toEqual(new Set(['0', '1']))
    compare(result, r)
  }, 180_000)

  it('a count per neuron (Poisson)', async () => {
    const { id, result } = await analysisOf(
      inventedNeuronCsv(),
      ['lab', 'mouse'],
      { response: 'puncta', family: 'poisson' },
      'R export, puncta',
      neuronDataset,
    )
    const { script, r } = await runExport(id)
    expect(script).toContain('family = poisson(link = "log")')
    expect(script).not.toContain('lmerTest')
    compare(result, r)
  }, 180_000)
})

describe('the R export over a read-only link', () => {
  it('is there when the unit table is shared, and answers 404 when it is not', async () => {
    const { id } = await analysisOf(
      neuriteCsv({ seed: 'r-export-link', mice: 6 }),
      ['mouse'],
      {},
      'R export, shared',
    )
    const link = async (allowUnitTable: boolean) => {
      const res = await postAs(app, team.cookies.pi, `/api/v1/analyses/${id}/share-links`, {
        versionNo: 1,
        allowUnitTable,
      })
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      return new URL(res.body.data.url as string).pathname.split('/').pop()!
    }
    const allowed = await link(true)
    const script = await request(app).get(`/api/v1/shared/${allowed}/r/script.R`)
    expect(script.status).toBe(200)
    expect(script.text).toContain('library(lmerTest)')
    const rows = await request(app).get(`/api/v1/shared/${allowed}/r/rows.csv`)
    expect(rows.status).toBe(200)
    const closed = await link(false)
    expect((await request(app).get(`/api/v1/shared/${closed}/r/script.R`)).status).toBe(404)
    expect((await request(app).get(`/api/v1/shared/${closed}/r/rows.csv`)).status).toBe(404)
  }, 120_000)
})
