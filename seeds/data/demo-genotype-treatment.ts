import seedrandom from 'seedrandom'

/**
 * The consortium's genotype × treatment study (invented): in each of three labs, 8 mice, 4 wild
 * type ("WT") and 4 of an invented knock-out line ("Nwl1-KO"); each mouse gives two coverslips,
 * one with vehicle and one with NW-117; 35–65 neurons per coverslip, neurite length (µm) and soma
 * area (µm²) each. Mouse labels restart in every lab, coverslip labels in every mouse.
 *
 * Built in: the knock-out grows shorter neurites (−12 µm) and smaller somata (−6 µm²); larger
 * somata carry longer neurites (+0.5 µm per µm²), so part of the genotype difference is soma size;
 * NW-117 adds 10 µm in wild type and 4 µm in the knock-out (an interaction); labs differ in level
 * and a little in how strongly they respond.
 */
export function genotypeTreatmentCsv(): string {
  const random = seedrandom('nestwise-demo-genotype-treatment')
  const normal = () => {
    let u = 0
    while (u === 0) u = random()
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random())
  }
  // Lab levels as in the consortium's first study (seeds/data/demo-datasets.ts), so the labs visibly differ.
  const labs = [
    { name: 'Nimbus', shift: 0 },
    { name: 'Fernhill', shift: 7 },
    { name: 'Larkspur', shift: -6 },
  ]
  const lines = ['lab,mouse,genotype,coverslip,treatment,neuron,soma_area_um2,neurite_length_um']
  for (const { name: lab, shift: labShift } of labs) {
    const labResponse = normal() * 2
    for (let m = 1; m <= 8; m++) {
      const knockout = m % 2 === 0
      const genotype = knockout ? 'Nwl1-KO' : 'WT'
      const mouseShift = normal() * 7 + (knockout ? -12 : 0)
      // Vehicle comes first in half the mice of each genotype: the coverslip label says nothing about treatment.
      const treatments = m % 4 < 2 ? ['vehicle', 'NW-117'] : ['NW-117', 'vehicle']
      treatments.forEach((treatment, c) => {
        const treated = treatment === 'NW-117'
        const effect = treated ? (knockout ? 4 : 10) + labResponse : 0
        const coverslipShift = normal() * 4 + effect
        const neurons = 35 + Math.floor(random() * 31)
        for (let n = 1; n <= neurons; n++) {
          const soma = 86 + (knockout ? -6 : 0) + normal() * 11
          const length = 118 + labShift + mouseShift + coverslipShift + 0.5 * (soma - 86) + normal() * 20
          lines.push(
            [lab, `m${m}`, genotype, `cs${c + 1}`, treatment, n, soma.toFixed(1), length.toFixed(1)].join(
              ',',
            ),
          )
        }
      })
    }
  }
  return lines.join('\n') + '\n'
}
