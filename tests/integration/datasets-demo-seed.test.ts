import { afterAll, describe, expect, it } from 'vitest'
import { db } from '../../server/db'
import { loadNestedColumns } from '../../server/rows-store/read-back'
import { seed as seedPeople } from '../../seeds/01-demo-people'
import { seed as seedDatasets } from '../../seeds/02-demo-datasets'
import { unitMeansTest } from '../../shared/stats/unit-means-test'
import { welchTest } from '../../shared/stats/welch-test'
import { closeConnections } from '../support/api'

afterAll(closeConnections)

async function versionOf(
  name: string,
): Promise<{ id: number; suggestion: { conditionPlacement: string; conditionLevel: string | null } }> {
  return db('dataset_versions as v')
    .join('datasets as d', 'd.id', 'v.dataset_id')
    .where('d.name', name)
    .first('v.id', 'v.suggestion')
}

const summary = (values: number[]) => {
  const mean = values.reduce((a, b) => a + b, 0) / values.length
  return {
    n: values.length,
    mean,
    variance: values.reduce((a, v) => a + (v - mean) ** 2, 0) / (values.length - 1),
  }
}

describe('demo datasets seed', () => {
  it('stores the five demo datasets once, tagged, and a second run adds nothing', async () => {
    await seedPeople(db)
    await seedDatasets(db)
    await seedDatasets(db)
    const rows = await db('datasets as d')
      .join('labs as l', 'l.id', 'd.lab_id')
      .whereIn('l.slug', ['nimbus-neurite-lab', 'fernhill-culture-lab'])
      .select('d.name')
    expect(rows.map((r) => r.name).sort()).toEqual([
      'Consortium outgrowth, three labs',
      'Genotype × treatment, three labs',
      'Outgrowth, single lab (NW-117 vs vehicle)',
      'Plate reader, three doses',
      'Within-mouse coverslips',
    ])
    const taggings = await db('dataset_taggings as t')
      .join('dataset_versions as v', 'v.id', 't.version_id')
      .join('datasets as d', 'd.id', 'v.dataset_id')
      .whereIn(
        'd.name',
        rows.map((r) => r.name),
      )
      .count<{ n: number }[]>('* as n')
      .first()
    expect(Number(taggings?.n)).toBe(5)
  })

  it('single lab: the naive test is "significant", the test on mouse means is not', async () => {
    const version = await versionOf('Outgrowth, single lab (NW-117 vs vehicle)')
    const columns = await loadNestedColumns(version.id, {
      response: 'neurite_length_um',
      conditions: ['treatment'],
      covariates: [],
      levels: ['mouse'],
    })
    const byArm = new Map<string, number[]>()
    const byMouse = new Map<string, { arm: string; values: number[] }>()
    columns.response.forEach((y, r) => {
      const arm = columns.factors![0].labels[columns.factors![0].codes[r]]
      const mouse = columns.levels[0].labels[columns.levels[0].codes[r]]
      byArm.set(arm, [...(byArm.get(arm) ?? []), y])
      if (!byMouse.has(mouse)) byMouse.set(mouse, { arm, values: [] })
      byMouse.get(mouse)!.values.push(y)
    })
    // Demo property (common practice, no source): with 5 mice per arm the cell-level test overstates the evidence.
    const naive = welchTest(summary(byArm.get('NW-117')!), summary(byArm.get('vehicle')!))
    const means = (arm: string) =>
      [...byMouse.values()].filter((m) => m.arm === arm).map((m) => summary(m.values).mean)
    const unitMeans = unitMeansTest([means('vehicle'), means('NW-117')])
    expect(means('vehicle')).toHaveLength(5)
    expect(naive.p).toBeLessThan(0.05)
    expect(unitMeans.p).toBeGreaterThan(0.05)
  })

  it('consortium: Larkspur spreads about twice as much as the other labs', async () => {
    const version = await versionOf('Consortium outgrowth, three labs')
    const columns = await loadNestedColumns(version.id, {
      response: 'neurite_length_um',
      conditions: ['treatment'],
      covariates: [],
      levels: ['lab', 'mouse'],
    })
    const sd = (lab: string) => {
      const values = Array.from(columns.response).filter(
        (_, r) => columns.levels[0].labels[columns.levels[0].codes[r]] === lab,
      )
      return Math.sqrt(summary(values).variance)
    }
    expect(sd('Larkspur') / sd('Nimbus')).toBeGreaterThan(1.6)
    expect(sd('Larkspur') / sd('Fernhill')).toBeGreaterThan(1.6)
  })

  it('within-mouse and plate designs are recognised where the condition varies', async () => {
    expect((await versionOf('Within-mouse coverslips')).suggestion).toMatchObject({
      conditionLevel: 'coverslip',
      conditionPlacement: 'between-units',
    })
    expect((await versionOf('Plate reader, three doses')).suggestion).toMatchObject({
      conditionPlacement: 'within-innermost',
    })
  })

  it('genotype × treatment: genotype between mice, treatment within mice, every cell in every lab, soma area a number', async () => {
    const version = await versionOf('Genotype × treatment, three labs')
    const columns = await loadNestedColumns(version.id, {
      response: 'neurite_length_um',
      conditions: ['genotype', 'treatment'],
      covariates: ['soma_area_um2'],
      levels: ['lab', 'mouse', 'coverslip'],
    })
    const [lab, mouse] = columns.levels
    const [genotype, treatment] = columns.factors!
    const label = (f: { labels: string[]; codes: Int32Array }, r: number) => f.labels[f.codes[r]]
    const genotypesOfMouse = new Map<string, Set<string>>()
    const treatmentsOfMouse = new Map<string, Set<string>>()
    const cells = new Set<string>()
    for (let r = 0; r < columns.response.length; r++) {
      const key = `${label(lab, r)}/${label(mouse, r)}`
      if (!genotypesOfMouse.has(key)) genotypesOfMouse.set(key, new Set())
      if (!treatmentsOfMouse.has(key)) treatmentsOfMouse.set(key, new Set())
      genotypesOfMouse.get(key)!.add(label(genotype, r))
      treatmentsOfMouse.get(key)!.add(label(treatment, r))
      cells.add(`${label(lab, r)}|${label(genotype, r)}|${label(treatment, r)}`)
    }
    // By construction (seeds/data/demo-genotype-treatment.ts): 3 labs × 8 mice, a few thousand neurons.
    expect(genotypesOfMouse.size).toBe(24)
    expect(columns.response.length).toBeGreaterThan(2000)
    expect(columns.response.length).toBeLessThan(5000)
    expect([...genotypesOfMouse.values()].every((g) => g.size === 1)).toBe(true)
    expect([...treatmentsOfMouse.values()].every((t) => t.size === 2)).toBe(true)
    expect(cells.size).toBe(3 * 2 * 2)
    expect([...genotype.labels].sort()).toEqual(['Nwl1-KO', 'WT'])
    const soma = columns.covariates![0].values
    expect(soma.every((v) => Number.isFinite(v))).toBe(true)
    // The knock-out's somata are built 6 µm² smaller: the covariate differs between genotypes.
    const meanSoma = (g: string) => {
      const values = Array.from(soma).filter((_, r) => label(genotype, r) === g)
      return values.reduce((a, b) => a + b, 0) / values.length
    }
    expect(meanSoma('WT') - meanSoma('Nwl1-KO')).toBeGreaterThan(3)
  })
})
