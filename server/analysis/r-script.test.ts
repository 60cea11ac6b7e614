import { describe, expect, it } from 'vitest'
import type { AnalysisResult } from '../../shared/schemas/analysis-result'
import demo from '../../shared/report/fixtures/single-lab-demo.json'
import { twoFactorResult } from '../../shared/report/fixtures/two-factor-result'
import { rRowsCsvChunks } from './r-rows-csv'
import {
  rCoefficientNames,
  rComponentGroups,
  rExportColumns,
  rFactors,
  rFormula,
  rName,
  rScript,
  rString,
} from './r-script'

// Fixtures: the stored engine-0.1 result of the single-lab demo, and an engine-0.2-shaped two-factor result.
const v01 = demo.result as AnalysisResult

describe('the R script', () => {
  it('writes names R can read: plain when syntactic, else in backticks', () => {
    expect(rName('soma_area_um2')).toBe('soma_area_um2')
    expect(rName('soma area (µm²)')).toBe('`soma area (µm²)`')
    expect(rString('say "hi"\\n')).toBe('"say \\"hi\\"\\\\n"')
  })

  it('uses the stored formula, and for engine 0.1 the nested model that engine fitted', () => {
    expect(rFormula(twoFactorResult)).toBe(twoFactorResult.model!.formula)
    expect(rFormula(v01)).toBe('neurite_length_um ~ treatment + (1|mouse)')
    expect(rFactors(v01)).toEqual([{ name: 'treatment', labels: ['vehicle', 'NW-117'] }])
    expect(rComponentGroups(v01)).toEqual(['mouse', 'Residual'])
  })

  it('names coefficients and components as lme4 does', () => {
    expect(rCoefficientNames(twoFactorResult)).toEqual([
      '(Intercept)',
      'genotypeKO',
      'treatmentKX-9',
      'genotypeKO:treatmentKX-9',
      'soma_area_um2',
    ])
    expect(rComponentGroups(twoFactorResult)).toEqual([
      'lab',
      'lab:genotype',
      'lab:treatment',
      'lab:genotype:treatment',
      'lab:mouse',
      'Residual',
    ])
  })

  it('sets the reference level first and checks the number of rows', () => {
    const script = rScript({
      analysisName: 'Neurite length "demo"',
      versionNo: 2,
      result: twoFactorResult,
      dataFile: 'x-v2-rows.csv',
      engineVersion: '0.2.0',
      datasetSha256: 'abc',
      columns: rExportColumns(twoFactorResult, { family: 'gaussian', trials: null }),
    })
    expect(script).toContain('d[["genotype"]] <- factor(d[["genotype"]], levels = c("WT", "KO"))')
    expect(script).toContain(`stopifnot(nrow(d) == ${twoFactorResult.nObs})`)
    expect(script).toContain(
      `model <- lmer(${twoFactorResult.model!.formula}, data = d, REML = TRUE, control = control)`,
    )
    expect(script).toContain('print(anova(model, type = 3, ddf = "Satterthwaite"))')
  })
})

describe('the rows file', () => {
  it('writes the kept rows only, labels exactly as stored, numbers in full precision', () => {
    const chunks = [
      ...rRowsCsvChunks(
        {
          responseName: 'length',
          response: Float64Array.from([1.25, Number.NaN, 0.1 + 0.2, 4]),
          levels: [{ name: 'mouse', codes: Int32Array.from([0, 0, 1, 1]), labels: ['m1', '=m,2'] }],
          factors: [{ name: 'treatment', codes: Int32Array.from([0, 0, 1, 1]), labels: ['vehicle', 'drug'] }],
          covariates: [{ name: 'soma', values: Float64Array.from([10, 11, 12, Number.NaN]) }],
        },
        {
          response: 'length',
          trials: null,
          levels: ['mouse'],
          conditions: ['treatment'],
          covariates: ['soma'],
        },
      ),
    ]
    // Row 2 lacks the response, row 4 the covariate: both left out, as the engine left them out.
    expect(chunks.join('')).toBe(
      'length,mouse,treatment,soma\n1.25,m1,vehicle,10\n0.30000000000000004,"=m,2",drug,12\n',
    )
  })

  it('writes successes beside their trials, leaving out rows without trials', () => {
    const chunks = [
      ...rRowsCsvChunks(
        {
          responseName: 'positive',
          response: Float64Array.from([3, 5, 2]),
          trials: Float64Array.from([10, Number.NaN, 4]),
          trialsName: 'counted',
          levels: [{ name: 'mouse', codes: Int32Array.from([0, 1, 2]), labels: ['m1', 'm2', 'm3'] }],
        },
        { response: 'positive', trials: 'counted', levels: ['mouse'], conditions: [], covariates: [] },
      ),
    ]
    expect(chunks.join('')).toBe('positive,counted,mouse\n3,10,m1\n2,4,m3\n')
  })

  it('names its columns from the result, with trials only for a binomial response', () => {
    expect(rExportColumns(twoFactorResult, { family: 'poisson', trials: 'counted' })).toEqual({
      response: 'neurite_length_um',
      trials: null,
      levels: twoFactorResult.levels.map((l) => l.name),
      conditions: ['genotype', 'treatment'],
      covariates: ['soma_area_um2'],
    })
  })
})
