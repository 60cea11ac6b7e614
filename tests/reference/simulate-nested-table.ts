import seedrandom from 'seedrandom'

export interface NestedSimulation {
  seed: string
  /** Number of outermost units (labs). */
  labs: number
  /** Range of animals per lab. */
  animals: [number, number]
  /** Range of slices per animal; omit for a two-level design. */
  slices?: [number, number]
  /** Range of cells per innermost unit (per unit × condition when the condition varies within animals). */
  cells: [number, number]
  /** Standard deviations of the random effects and the residual. */
  sd: {
    lab: number
    /** Lab × condition: how much the condition's effect differs from lab to lab. */
    labCondition?: number
    animal: number
    slice?: number
    animalCondition?: number
    residual: number
  }
  /** A second factor carried by the animals (alternating inside each lab), with its effect per label. */
  genotype?: { labels: string[]; effects: number[]; interaction?: number }
  /** A per-cell covariate ("soma", about 100 ± 15) entering with this slope. */
  somaSlope?: number
  conditions: string[]
  /** Mean of each condition. */
  means: number[]
  /** Which unit carries the condition: each lab, each animal, or cells within animals. */
  conditionAt: 'lab' | 'animal' | 'within'
  /** Share of responses replaced by NaN (missing). */
  missing?: number
}

export type SimulatedTable = Record<string, (string | number)[]>

/**
 * Test helper: an invented, seeded, unbalanced nested data set (labs > animals [> slices] > cells,
 * neurite length of imaginary neurons), optionally with a lab × condition effect, a genotype
 * carried by the animals and a soma-size covariate per cell. Animal labels restart at "1" in every lab, so units are
 * told apart only by their path. Within-animal designs give each animal two or more conditions.
 *
 * @example
 * simulateNestedTable({ seed: 'a', labs: 4, animals: [3, 5], cells: [2, 8], sd: { lab: 1, animal: 1, residual: 1 },
 *   conditions: ['ctl', 'drug'], means: [10, 11], conditionAt: 'animal' }).length // → number of rows
 */
export function simulateNestedTable(sim: NestedSimulation): SimulatedTable {
  const rng = seedrandom(sim.seed)
  const int = ([lo, hi]: [number, number]) => lo + Math.floor(rng() * (hi - lo + 1))
  const normal = (sd: number) => sd * Math.sqrt(-2 * Math.log(1 - rng())) * Math.cos(2 * Math.PI * rng())
  const table: SimulatedTable = { lab: [], animal: [], slice: [], condition: [], genotype: [], soma: [], length: [] }
  const k = sim.conditions.length
  const g = sim.genotype

  for (let l = 0; l < sim.labs; l++) {
    const labEffect = normal(sim.sd.lab)
    const labByCondition = sim.conditions.map(() => normal(sim.sd.labCondition ?? 0))
    const labCondition = l % k
    const nAnimals = int(sim.animals)
    for (let a = 0; a < nAnimals; a++) {
      const animalEffect = normal(sim.sd.animal)
      const animalCondition = (a + l) % k
      const genotype = g ? (a + l + Math.floor(a / k)) % g.labels.length : 0
      let conditions: number[]
      if (sim.conditionAt === 'lab') conditions = [labCondition]
      else if (sim.conditionAt === 'animal') conditions = [animalCondition]
      else
        conditions = sim.conditions
          .map((_, c) => c)
          .filter((c) => c === animalCondition || c === (animalCondition + 1) % k || rng() < 0.6)
      const nSlices = sim.slices ? int(sim.slices) : 1
      for (let s = 0; s < nSlices; s++) {
        const sliceEffect = sim.slices ? normal(sim.sd.slice ?? 0) : 0
        for (const c of conditions) {
          const cellEffect = normal(sim.sd.animalCondition ?? 0)
          const nCells = int(sim.cells)
          for (let i = 0; i < nCells; i++) {
            const soma = Math.round((100 + normal(15)) * 100) / 100
            const genotypeEffect = g ? g.effects[genotype] + (c > 0 && genotype > 0 ? (g.interaction ?? 0) : 0) : 0
            const value =
              sim.means[c] +
              genotypeEffect +
              (sim.somaSlope ?? 0) * (soma - 100) +
              labEffect +
              labByCondition[c] +
              animalEffect +
              sliceEffect +
              cellEffect +
              normal(sim.sd.residual)
            table.lab.push(`L${l + 1}`)
            table.animal.push(String(a + 1))
            table.slice.push(`s${s + 1}`)
            table.condition.push(sim.conditions[c])
            table.genotype.push(g ? g.labels[genotype] : '')
            table.soma.push(soma)
            table.length.push(rng() < (sim.missing ?? 0) ? NaN : Math.round(value * 1e6) / 1e6)
          }
        }
      }
    }
  }
  return table
}
