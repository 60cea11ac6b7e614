import seedrandom from 'seedrandom'
import { genotypeTreatmentCsv } from './demo-genotype-treatment'

/**
 * The demo datasets: invented per-cell tables of a fictional consortium measuring neurite length
 * (µm) per neuron in primary cultures, one culture per mouse, vehicle against the invented
 * compound NW-117. Generated from fixed seeds, so every install shows the same numbers.
 */
export interface DemoDataset {
  labSlug: string
  uploaderEmail: string
  project: string
  name: string
  description: string
  filename: string
  csv: string
  tagging: { responseColumns: string[]; conditionColumn: string | null; levels: string[] }
}

type Random = () => number

function normalFrom(random: Random): () => number {
  return () => {
    let u = 0
    while (u === 0) u = random()
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random())
  }
}

const between = (random: Random, low: number, high: number) => low + Math.floor(random() * (high - low + 1))
const pad = (n: number) => String(n).padStart(2, '0')

/**
 * One lab, 5 mice per arm, 20–60 neurons each. Mice differ a lot (SD 14 µm) against a modest
 * compound effect (+9 µm): hundreds of neurons make the naive test "significant"; five mice per arm
 * do not.
 */
export function singleLabOutgrowth(): string {
  const random = seedrandom('nestwise-demo-single-lab')
  const normal = normalFrom(random)
  const lines = ['mouse,treatment,neuron,neurite_length_um,soma_area_um2']
  for (let m = 1; m <= 10; m++) {
    const treatment = m <= 5 ? 'vehicle' : 'NW-117'
    const mouseShift = normal() * 14 + (treatment === 'NW-117' ? 9 : 0)
    const neurons = between(random, 20, 60)
    for (let n = 1; n <= neurons; n++) {
      const length = 118 + mouseShift + normal() * 24
      const soma = 82 + normal() * 10
      lines.push(`N-M${pad(m)},${treatment},${n},${length.toFixed(1)},${soma.toFixed(1)}`)
    }
  }
  return lines.join('\n') + '\n'
}

/**
 * Three labs, 6 mice each (labels m1…m6 reused in every lab), 3 per arm. Larkspur's neurons spread
 * about twice as much as the others', for the agreement page.
 */
export function consortiumOutgrowth(): string {
  const random = seedrandom('nestwise-demo-consortium')
  const normal = normalFrom(random)
  const labs = [
    { name: 'Nimbus', shift: 0, mouseSd: 6, cellSd: 22 },
    { name: 'Fernhill', shift: 7, mouseSd: 6, cellSd: 21 },
    { name: 'Larkspur', shift: -4, mouseSd: 12, cellSd: 45 },
  ]
  const lines = ['lab,mouse,treatment,neuron,neurite_length_um']
  for (const lab of labs) {
    for (let m = 1; m <= 6; m++) {
      const treatment = m % 2 ? 'vehicle' : 'NW-117'
      const mouseShift = normal() * lab.mouseSd + (treatment === 'NW-117' ? 10 : 0)
      const neurons = between(random, 25, 45)
      for (let n = 1; n <= neurons; n++) {
        lines.push(
          `${lab.name},m${m},${treatment},${n},${(120 + lab.shift + mouseShift + normal() * lab.cellSd).toFixed(1)}`,
        )
      }
    }
  }
  return lines.join('\n') + '\n'
}

/**
 * Each of 6 mice gives four coverslips, two treated with NW-117 and two left untreated. Mice differ
 * strongly (SD 20 µm); the compound adds 8 µm on every mouse, so comparing within mice is sharp.
 */
export function withinMouseCoverslips(): string {
  const random = seedrandom('nestwise-demo-within-mouse')
  const normal = normalFrom(random)
  const lines = ['mouse,coverslip,treatment,neuron,neurite_length_um']
  for (let m = 1; m <= 6; m++) {
    const mouseShift = normal() * 20
    for (let c = 1; c <= 4; c++) {
      const treatment = c <= 2 ? 'untreated' : 'NW-117'
      const coverslipShift = normal() * 4 + (treatment === 'NW-117' ? 8 : 0)
      const neurons = between(random, 15, 30)
      for (let n = 1; n <= neurons; n++) {
        lines.push(
          `F-M${pad(m)},cs${c},${treatment},${n},${(115 + mouseShift + coverslipShift + normal() * 20).toFixed(1)}`,
        )
      }
    }
  }
  return lines.join('\n') + '\n'
}

/** Plate reader: 3 experiment days × 2 plates × 24 wells, three doses of NW-117 (8 wells each per plate). */
export function plateReaderDoses(): string {
  const random = seedrandom('nestwise-demo-plates')
  const normal = normalFrom(random)
  const doses = [
    { label: '0 µM', effect: 0 },
    { label: '1 µM', effect: 6 },
    { label: '10 µM', effect: 15 },
  ]
  const rows = 'ABCD'
  const lines = ['day,plate,well,dose,viability_au']
  for (let d = 1; d <= 3; d++) {
    const dayShift = normal() * 9
    for (let p = 1; p <= 2; p++) {
      const plateShift = normal() * 4
      for (let w = 0; w < 24; w++) {
        const dose = doses[Math.floor(w / 8)]
        const well = `${rows[Math.floor(w / 6)]}${(w % 6) + 1}`
        lines.push(
          `2026-03-0${d + 2},P${p},${well},${dose.label},${(100 + dayShift + plateShift + dose.effect + normal() * 5).toFixed(2)}`,
        )
      }
    }
  }
  return lines.join('\n') + '\n'
}

export function demoDatasets(): DemoDataset[] {
  return [
    {
      labSlug: 'nimbus-neurite-lab',
      uploaderEmail: 'sami@example.org',
      project: 'NW-117 outgrowth',
      name: 'Outgrowth, single lab (NW-117 vs vehicle)',
      description:
        'Neurite length per neuron in primary cortical cultures, one culture per mouse, 5 mice per arm. Invented demo data.',
      filename: 'nimbus-outgrowth-2026-03.csv',
      csv: singleLabOutgrowth(),
      tagging: {
        responseColumns: ['neurite_length_um', 'soma_area_um2'],
        conditionColumn: 'treatment',
        levels: ['mouse'],
      },
    },
    {
      labSlug: 'nimbus-neurite-lab',
      uploaderEmail: 'petra@example.org',
      project: 'Consortium NW-117',
      name: 'Consortium outgrowth, three labs',
      description:
        'The same protocol run in three labs of the consortium; mouse labels restart in every lab. Invented demo data.',
      filename: 'consortium-outgrowth.csv',
      csv: consortiumOutgrowth(),
      tagging: {
        responseColumns: ['neurite_length_um'],
        conditionColumn: 'treatment',
        levels: ['lab', 'mouse'],
      },
    },
    {
      labSlug: 'fernhill-culture-lab',
      uploaderEmail: 'hugo@example.org',
      project: 'Paired coverslips',
      name: 'Within-mouse coverslips',
      description: 'Treated and untreated coverslips from each mouse. Invented demo data.',
      filename: 'fernhill-coverslips.csv',
      csv: withinMouseCoverslips(),
      tagging: {
        responseColumns: ['neurite_length_um'],
        conditionColumn: 'treatment',
        levels: ['mouse', 'coverslip'],
      },
    },
    {
      labSlug: 'fernhill-culture-lab',
      uploaderEmail: 'hugo@example.org',
      project: 'Dose response',
      name: 'Plate reader, three doses',
      description:
        'Viability per well; wells in plates in experiment days, three doses of NW-117. Invented demo data.',
      filename: 'fernhill-plates.csv',
      csv: plateReaderDoses(),
      tagging: { responseColumns: ['viability_au'], conditionColumn: 'dose', levels: ['day', 'plate'] },
    },
    {
      labSlug: 'nimbus-neurite-lab',
      uploaderEmail: 'petra@example.org',
      project: 'Consortium NW-117',
      name: 'Genotype × treatment, three labs',
      description:
        'Wild-type and Nwl1 knock-out mice (an invented line) in three labs; two coverslips per mouse, one with vehicle and one with NW-117; soma area measured per neuron. Invented demo data.',
      filename: 'consortium-genotype-treatment.csv',
      csv: genotypeTreatmentCsv(),
      tagging: {
        responseColumns: ['neurite_length_um'],
        conditionColumn: 'treatment',
        levels: ['lab', 'mouse', 'coverslip'],
      },
    },
  ]
}
