/**
 * End-to-end: spawns the command line on fixture files (invented data) and checks the single
 * JSON document on stdout, the exit codes and the one-line messages on stderr.
 */
import { spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { afterAll, describe, expect, it } from 'vitest'
import { inventedNeuronCsv, inventedNeuronRows } from '../../shared/analysis/fixtures/invented-glmm-tables'
import { AnalysisResult } from '../../shared/schemas/analysis-result'

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..')
const fixture = (name: string) => join('tests', 'fixtures', 'cli', name)

function nestwise(...args: string[]) {
  const run = spawnSync(process.execPath, ['scripts/run-nestwise.mjs', ...args], {
    cwd: root,
    encoding: 'utf8',
  })
  return { code: run.status, stdout: run.stdout, stderr: run.stderr }
}

const analyzeCells = ['--response', 'neurite_length_um', '--levels', 'lab,mouse', '--condition', 'treatment']
const analyzeTwoFactors = [
  '--response',
  'neurite_length_um',
  '--levels',
  'lab,mouse',
  '--condition',
  'genotype,treatment',
  '--covariate',
  'soma_area_um2',
]
/** Engine 0.1 fits one factor and no covariate; 0.2 fits two factors and covariates. */

// Each test spawns the command line one to three times (the first may rebuild its bundle); a busy
// machine makes that slow, hence the long timeout.
const SPAWNING = { timeout: 180_000 }

describe('nestwise analyze', SPAWNING, () => {
  const csv = nestwise('analyze', fixture('cells.csv'), ...analyzeCells, '--reference', 'vehicle')

  it('prints exactly one JSON document matching the result schema, nothing else', () => {
    expect(csv.stderr).toBe('')
    expect(csv.code).toBe(0)
    expect(csv.stdout.trim().split('\n')).toHaveLength(1)
    const result = AnalysisResult.parse(JSON.parse(csv.stdout))
    expect(result).toMatchObject({
      nObs: 62,
      response: 'neurite_length_um',
      condition: 'treatment',
      reference: 'vehicle',
      conditionLevel: 'mouse',
    })
    expect(result.levels.map((l) => [l.name, l.nUnits])).toEqual([
      ['lab', 4],
      ['mouse', 16],
    ])
    // Treatment varies between mice inside each lab: the maximal nested model (engine 0.2) adds lab:treatment.
    expect(result.varianceComponents.map((c) => c.level)).toEqual([
      'lab',
      'lab:treatment',
      'mouse',
      'residual',
    ])
    expect(result.groups.map((g) => g.condition).sort()).toEqual(['NW-117', 'vehicle'])
    expect(result.comparisons.mixedModel!.contrasts[0]).toMatchObject({ a: 'NW-117', b: 'vehicle' })
    expect(result.engine.version).toMatch(/^\d+\.\d+\.\d+$/)
  })

  it('reads the same table with semicolons and decimal commas, and as a TSV with BOM and CRLF', () => {
    const semicolon = nestwise(
      'analyze',
      fixture('cells-semicolon-decimal-comma.csv'),
      ...analyzeCells,
      '--reference',
      'vehicle',
      '--decimal',
      ',',
    )
    const tsv = nestwise(
      'analyze',
      fixture('cells-bom-crlf.tsv'),
      ...analyzeCells,
      '--reference',
      'vehicle',
      '--delimiter',
      'tab',
    )
    expect(semicolon.code).toBe(0)
    expect(tsv.code).toBe(0)
    expect(JSON.parse(semicolon.stdout)).toEqual(JSON.parse(csv.stdout))
    expect(JSON.parse(tsv.stdout)).toEqual(JSON.parse(csv.stdout))
  })

  it('adds a seeded bootstrap that reproduces', () => {
    const once = nestwise(
      'analyze',
      fixture('cells.csv'),
      ...analyzeCells,
      '--bootstrap',
      '200',
      '--seed',
      'fixed',
    )
    const twice = nestwise(
      'analyze',
      fixture('cells.csv'),
      ...analyzeCells,
      '--bootstrap',
      '200',
      '--seed',
      'fixed',
    )
    expect(once.code).toBe(0)
    const bootstrap = JSON.parse(once.stdout).comparisons.bootstrap
    expect(bootstrap).toMatchObject({ resamples: 200, seed: 'fixed' })
    expect(JSON.parse(twice.stdout).comparisons.bootstrap).toEqual(bootstrap)
  })

  it('documents itself under --help', () => {
    const help = nestwise('analyze', '--help')
    expect(help.code).toBe(0)
    expect(help.stdout).toContain('Usage: nestwise analyze FILE --response COL --levels OUTER,INNER')
    expect(help.stderr).toBe('')
  })

  it.each([
    [
      'a missing column, listing the available ones',
      ['analyze', fixture('cells.csv'), '--response', 'length', '--levels', 'lab,mouse'],
      /^nestwise: Column "length" not found\. Available columns: lab, mouse, treatment, neurite_length_um\.$/,
    ],
    [
      'a non-numeric value, naming row, line and column',
      ['analyze', fixture('bad-value.csv'), ...analyzeCells],
      /^nestwise: Row 7 \(line 8\): the response column "neurite_length_um" holds "n\.d\.", which is not a number\.$/,
    ],
    [
      'fewer than two outermost units',
      ['analyze', fixture('one-lab.csv'), ...analyzeCells],
      /^nestwise: The level "lab" has only 1 unit; at least 2 are needed\.$/,
    ],
    [
      'an unreadable file',
      ['analyze', fixture('absent.csv'), ...analyzeCells],
      /^nestwise: Cannot read ".*absent\.csv": no such file\.$/,
    ],
    [
      'an unknown reference condition',
      ['analyze', fixture('cells.csv'), ...analyzeCells, '--reference', 'saline'],
      /^nestwise: .*"saline".*$/,
    ],
    [
      'a covariate holding text, naming row, line and column',
      ['analyze', fixture('covariate-text.csv'), ...analyzeTwoFactors],
      /^nestwise: Row 9 \(line 10\): the covariate column "soma_area_um2" holds "n\.d\.", which is not a number\.$/,
    ],
    [
      'a reference that does not say which of two conditions it is for',
      ['analyze', fixture('genotype-treatment.csv'), ...analyzeTwoFactors, '--reference', 'WT'],
      /^nestwise: --reference "WT" does not say which condition it is for; use --reference genotype=LEVEL,treatment=LEVEL\.$/,
    ],
    ['an unknown command', ['summarise'], /^nestwise: Unknown command "summarise"/],
  ])('exits with code 2 and one line on stderr for %s', (_, args, message) => {
    const run = nestwise(...args)
    expect(run.code).toBe(2)
    expect(run.stdout).toBe('')
    expect(run.stderr.endsWith('\n')).toBe(true)
    expect(run.stderr.trimEnd().split('\n')).toHaveLength(1)
    expect(run.stderr.trimEnd()).toMatch(message)
  })
})

// Runs once the engine fits two factors and covariates (engine 0.2); until then such a design is refused.
describe('nestwise analyze, two factors and a covariate', SPAWNING, () => {
  it('prints exactly the engine’s result: factors, covariate, model formula and references per factor', () => {
    const run = nestwise(
      'analyze',
      fixture('genotype-treatment.csv'),
      ...analyzeTwoFactors,
      '--reference',
      'genotype=WT,treatment=vehicle',
    )
    expect(run.stderr).toBe('')
    expect(run.code).toBe(0)
    expect(run.stdout.trim().split('\n')).toHaveLength(1)
    const result = AnalysisResult.parse(JSON.parse(run.stdout))
    expect(result.nObs).toBe(72)
    expect(result.condition).toBe('genotype:treatment')
    expect(result.reference).toBe('WT:vehicle')
    expect(result.factors!.map((f) => f.name)).toEqual(['genotype', 'treatment'])
    expect(result.covariates!.map((c) => c.name)).toEqual(['soma_area_um2'])
    const formula = result.model!.formula
    expect(formula.startsWith('neurite_length_um ~ ')).toBe(true)
    for (const part of ['genotype * treatment', 'soma_area_um2', '(1|lab)']) expect(formula).toContain(part)
    const terms = result.comparisons.mixedModel!.terms!.map((t) => t.term)
    expect(terms).toEqual(
      expect.arrayContaining(['genotype', 'treatment', 'genotype:treatment', 'soma_area_um2']),
    )
  })
})

describe('nestwise analyze, binary and count responses', SPAWNING, () => {
  // Invented neurons in mice in three fictional labs (shared/analysis/fixtures/invented-glmm-tables.ts).
  const folder = mkdtempSync(join(tmpdir(), 'nestwise-glmm-'))
  const rows = inventedNeuronRows()
  const file = (name: string, text: string) => {
    const path = join(folder, name)
    writeFileSync(path, text)
    return path
  }
  const neurons = file('neurons.csv', inventedNeuronCsv(rows))
  afterAll(() => rmSync(folder, { recursive: true, force: true }))
  const marker = ['--response', 'marker', '--levels', 'lab,mouse', '--condition', 'treatment']

  it('fits a yes/no response as a logistic GLMM and says which value was yes', () => {
    const run = nestwise('analyze', neurons, ...marker, '--family', 'binomial', '--reference', 'vehicle')
    expect(run.stderr).toBe('')
    expect(run.code).toBe(0)
    const result = AnalysisResult.parse(JSON.parse(run.stdout))
    expect(result.family).toBe('binomial')
    expect(result.outcome).toEqual({ positive: 'positive', negative: 'negative' })
    expect(result.model).toMatchObject({
      formula: 'marker ~ treatment + (1|lab) + (1|lab:treatment) + (1|lab:mouse)',
      family: 'binomial(link = "logit")',
    })
    const [contrast] = result.comparisons.mixedModel!.contrasts
    expect(contrast).toMatchObject({ a: 'QZ-41', b: 'vehicle' })
    expect('ratio' in contrast && contrast.ratio).toBeCloseTo(Math.exp(contrast.estimate), 12)
    // Plain proportion of the vehicle arm, counted from the invented rows.
    const vehicle = rows.filter((r) => r.treatment === 'vehicle')
    expect(result.groups[0].mean).toBeCloseTo(
      vehicle.filter((r) => r.marker === 'positive').length / vehicle.length,
      12,
    )
  })

  it('fits counts as a Poisson GLMM', () => {
    const run = nestwise(
      'analyze',
      neurons,
      '--response',
      'puncta',
      '--levels',
      'lab,mouse,neuron',
      '--family',
      'poisson',
    )
    expect(run.code).toBe(0)
    const result = AnalysisResult.parse(JSON.parse(run.stdout))
    expect(result.family).toBe('poisson')
    expect(result.varianceComponents.at(-1)!.level).toBe('residual')
  })

  it.each([
    [
      'a third value in a yes/no response, naming row and line',
      () => [
        file('unsure.csv', inventedNeuronCsv(rows.map((r, i) => (i === 9 ? { ...r, marker: 'unsure' } : r)))),
        ...marker,
        '--family',
        'binomial',
      ],
      /^nestwise: Row 10 \(line 11\): the response column "marker" holds "unsure", a third value besides "(positive|negative)" and "(positive|negative)"; a --family binomial response holds two values \(or 0 and 1\)\.$/,
    ],
    [
      'a yes value the column lacks',
      () => [neurons, ...marker, '--family', 'binomial', '--positive', 'yes'],
      /^nestwise: --positive "yes" is not a value of "marker" \(it has "(positive|negative)" and "(positive|negative)"\)\.$/,
    ],
    [
      'a negative count, naming row and line',
      () => [
        file('negative.csv', inventedNeuronCsv(rows.map((r, i) => (i === 4 ? { ...r, puncta: -2 } : r)))),
        '--response',
        'puncta',
        '--levels',
        'lab,mouse',
        '--family',
        'poisson',
      ],
      /^nestwise: Row 5 \(line 6\): the response column "puncta" holds -2; a --family poisson response must be a whole number of at least 0\.$/,
    ],
    [
      'successes above the trials, naming row, line and both columns',
      () => [
        file(
          'aggregated.csv',
          'lab,mouse,positive_neurons,neurons\nhollowmere,m1,3,10\nhollowmere,m2,11,9\nquillby,m1,2,8\n',
        ),
        '--response',
        'positive_neurons',
        '--trials',
        'neurons',
        '--levels',
        'lab,mouse',
        '--family',
        'binomial',
      ],
      /^nestwise: Row 2 \(line 3\): 11 successes in "positive_neurons" but only 9 trials in "neurons"; successes cannot exceed the trials\.$/,
    ],
  ])('exits with code 2 and one line on stderr for %s', (_, args, message) => {
    const run = nestwise('analyze', ...args())
    expect(run.code).toBe(2)
    expect(run.stdout).toBe('')
    expect(run.stderr.trimEnd().split('\n')).toHaveLength(1)
    expect(run.stderr.trimEnd()).toMatch(message)
  })

  it('refuses to plan a difference of means from a yes/no analysis', () => {
    const run = nestwise('analyze', neurons, ...marker, '--family', 'binomial')
    const saved = file('marker-result.json', run.stdout)
    const plan = nestwise('plan', '--from', saved, '--difference', '0.1', '--obs', '10')
    expect(plan.code).toBe(2)
    expect(plan.stderr.trimEnd()).toMatch(/is a yes\/no analysis, whose variances are on the latent scale/)
  })

  it('documents the families under --help', () => {
    const help = nestwise('analyze', '--help').stdout
    for (const option of ['--family F', '--positive VALUE', '--trials COL']) expect(help).toContain(option)
  })
})

describe('nestwise plan', SPAWNING, () => {
  it('finds the units per arm of the clusterPower documentation example', () => {
    // clusterPower (R) crtpwr.2mean: m = 10, d = 1, ICC 0.1, σ² = 5, α 0.05, power 0.8 → 15.93 → 16 clusters per arm.
    const run = nestwise('plan', '--difference', '1', '--icc', '0.1', '--variance', '5', '--obs', '10')
    expect(run.stderr).toBe('')
    expect(run.code).toBe(0)
    const plan = JSON.parse(run.stdout)
    expect(plan.unitsNeeded.unitsPerArm).toBe(16)
    expect(plan.unitsNeeded.exact).toBeCloseTo(15.93, 2)
    expect(plan).toMatchObject({
      power: null,
      cheapestDesign: null,
      grid: null,
      engine: { version: expect.any(String) },
    })
  })

  it('takes the ICC of the condition level and the total SD from a saved analysis', () => {
    const folder = mkdtempSync(join(tmpdir(), 'nestwise-plan-'))
    try {
      const saved = join(folder, 'result.json')
      const analysis = nestwise('analyze', fixture('cells.csv'), ...analyzeCells)
      writeFileSync(saved, analysis.stdout)
      const result = AnalysisResult.parse(JSON.parse(analysis.stdout))
      const run = nestwise(
        'plan',
        '--from',
        saved,
        '--difference',
        '5',
        '--units',
        '6',
        '--obs',
        '20',
        '--cost-unit',
        '400',
        '--cost-obs',
        '2',
      )
      expect(run.code).toBe(0)
      const plan = JSON.parse(run.stdout)
      const total = result.varianceComponents.reduce((s, c) => s + c.variance, 0)
      expect(plan.inputs).toMatchObject({
        iccSource: { kind: 'analysis', level: 'mouse' },
        sdSource: 'analysis',
      })
      expect(plan.inputs.icc).toBeCloseTo(result.icc.find((i) => i.level === 'mouse')!.icc, 12)
      expect(plan.inputs.sdTotal).toBeCloseTo(Math.sqrt(total), 10)
      expect(plan.power.power).toBeGreaterThan(0)
      expect(plan.cheapestDesign.feasible).toBe(true)
      expect(plan.costOptimal.obsPerUnit).toBeGreaterThanOrEqual(1)
      const bad = nestwise('plan', '--from', fixture('cells.csv'), '--difference', '5', '--obs', '20')
      expect(bad.code).toBe(2)
      expect(bad.stderr).toMatch(/^nestwise: ".*cells\.csv" is not JSON/)
    } finally {
      rmSync(folder, { recursive: true, force: true })
    }
  })

  it('documents itself under --help and rejects a plan with nothing to compute', () => {
    const help = nestwise('plan', '--help')
    expect(help.code).toBe(0)
    expect(help.stdout).toContain('Usage: nestwise plan --difference D')
    const empty = nestwise('plan', '--difference', '1', '--icc', '0.1', '--sd', '2')
    expect(empty.code).toBe(2)
    expect(empty.stderr.trimEnd().split('\n')).toHaveLength(1)
  })
})
