import { closeSync, existsSync, mkdirSync, openSync, writeSync } from 'node:fs'
import { join, resolve } from 'node:path'
import seedrandom from 'seedrandom'

/**
 * Writes an invented consortium data set: neurite length per neuron, neurons nested in mice,
 * mice nested in labs, half of each lab's mice given the fictional compound NW-117, and labs
 * that differ in how strongly they respond (a lab × treatment effect). Animal labels repeat across
 * labs (m01 exists in every lab), as they do in real spreadsheets.
 */
export interface NestedCsvSpec {
  seed: string
  labs: number
  animalsPerLab: number
  minCells: number
  maxCells: number
  grandMean: number
  compoundEffect: number
  labSd: number
  /** SD of the lab × treatment effect: each arm of each lab is shifted by its own draw. */
  labTreatmentSd: number
  animalSd: number
  residualSd: number
}

export const BENCH_SPEC: NestedCsvSpec = {
  seed: 'nestwise-bench-1',
  labs: 12,
  animalsPerLab: 40,
  minCells: 1000,
  maxCells: 3000,
  grandMean: 120,
  compoundEffect: 6,
  labSd: 8,
  labTreatmentSd: 3,
  animalSd: 5,
  residualSd: 25,
}

export const QUICK_SPEC: NestedCsvSpec = {
  ...BENCH_SPEC,
  seed: 'nestwise-bench-quick',
  animalsPerLab: 10,
  minCells: 100,
  maxCells: 300,
}

/** The benchmark data set (BENCH_SPEC) in .bench/analysis, written the first time it is asked for. */
export function benchCsv(): string {
  const dir = resolve('.bench/analysis')
  mkdirSync(dir, { recursive: true })
  const csvPath = join(dir, `${BENCH_SPEC.seed}.csv`)
  if (!existsSync(csvPath)) {
    const rows = writeNestedCsv(csvPath, BENCH_SPEC)
    console.log(`[bench] wrote ${rows.toLocaleString('en-US')} rows → ${csvPath}`)
  }
  return csvPath
}

export const CSV_HEADER = 'lab,animal,treatment,neurite_length_um'
export const BINARY_HEADER = 'lab,animal,treatment,marker_positive'

/**
 * The same consortium with a yes/no response per neuron (marker-positive or not) on the logit
 * scale: baseline log odds, the compound's effect, lab, lab × treatment and mouse SDs.
 */
export const BINARY_SPEC = {
  seed: 'nestwise-bench-binary-1',
  labs: 12,
  animalsPerLab: 40,
  minCells: 1000,
  maxCells: 3000,
  baselineLogOdds: -0.6,
  compoundEffect: 0.35,
  labSd: 0.5,
  labTreatmentSd: 0.25,
  animalSd: 0.4,
}
export const BINARY_QUICK_SPEC = {
  ...BINARY_SPEC,
  seed: 'nestwise-bench-binary-quick',
  animalsPerLab: 10,
  minCells: 100,
  maxCells: 300,
}
export type BinaryCsvSpec = typeof BINARY_SPEC

/** Standard normal draws from a seeded uniform source (Box–Muller, both values used). */
function normalSource(uniform: () => number): () => number {
  let spare: number | null = null
  return () => {
    if (spare !== null) {
      const value = spare
      spare = null
      return value
    }
    let u = 0
    while (u === 0) u = uniform()
    const radius = Math.sqrt(-2 * Math.log(u))
    const angle = 2 * Math.PI * uniform()
    spare = radius * Math.sin(angle)
    return radius * Math.cos(angle)
  }
}

const pad = (n: number) => String(n).padStart(2, '0')

/** Writes the CSV to `path` and returns the number of data rows. */
export function writeNestedCsv(path: string, spec: NestedCsvSpec): number {
  return writeConsortiumCsv(
    path,
    CSV_HEADER,
    { ...spec, baseline: spec.grandMean },
    (normal, centre) => () => (centre + spec.residualSd * normal()).toFixed(3),
  )
}

/** Writes the yes/no table to `path` and returns the number of data rows. */
export function writeBinaryCsv(path: string, spec: BinaryCsvSpec): number {
  return writeConsortiumCsv(
    path,
    BINARY_HEADER,
    { ...spec, baseline: spec.baselineLogOdds },
    (_, eta, uniform) => {
      const p = 1 / (1 + Math.exp(-eta))
      return () => (uniform() < p ? '1' : '0')
    },
  )
}

/**
 * The consortium both tables share: per lab a shift and one per arm, half of its animals (at
 * random) given NW-117, per animal a centre (baseline + lab + arm + animal + the compound's
 * effect) and a random number of cells whose values `cellsOf` draws around that centre.
 */
function writeConsortiumCsv(
  path: string,
  header: string,
  spec: Omit<NestedCsvSpec, 'grandMean' | 'residualSd'> & { baseline: number },
  cellsOf: (normal: () => number, centre: number, uniform: () => number) => () => string,
): number {
  const uniform = seedrandom(spec.seed)
  const normal = normalSource(uniform)
  const fd = openSync(path, 'w')
  let rows = 0
  try {
    writeSync(fd, header + '\n')
    for (let lab = 1; lab <= spec.labs; lab++) {
      const labShift = spec.labSd * normal()
      const armShift = [spec.labTreatmentSd * normal(), spec.labTreatmentSd * normal()]
      const treatedAnimals = new Set(
        shuffledIndices(spec.animalsPerLab, uniform).slice(0, Math.floor(spec.animalsPerLab / 2)),
      )
      for (let animal = 0; animal < spec.animalsPerLab; animal++) {
        const treated = treatedAnimals.has(animal)
        const prefix = `lab-${pad(lab)},m${pad(animal + 1)},${treated ? 'NW-117' : 'vehicle'},`
        const centre =
          spec.baseline +
          labShift +
          armShift[treated ? 1 : 0] +
          spec.animalSd * normal() +
          (treated ? spec.compoundEffect : 0)
        const cell = cellsOf(normal, centre, uniform)
        const cells = spec.minCells + Math.floor(uniform() * (spec.maxCells - spec.minCells + 1))
        const lines: string[] = new Array(cells)
        for (let c = 0; c < cells; c++) lines[c] = prefix + cell()
        writeSync(fd, lines.join('\n') + '\n')
        rows += cells
      }
    }
  } finally {
    closeSync(fd)
  }
  return rows
}

function shuffledIndices(n: number, uniform: () => number): number[] {
  const order = Array.from({ length: n }, (_, i) => i)
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(uniform() * (i + 1))
    ;[order[i], order[j]] = [order[j], order[i]]
  }
  return order
}
