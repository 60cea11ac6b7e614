import { studentTTwoSidedP } from './reml/student-t-two-sided-p'
import seedrandom from 'seedrandom'
import { describe, expect, it } from 'vitest'
import { threeLevelPower } from './three-level-power'

/**
 * The three-level power, checked by simulation (common practice, no source): draw experiments
 * from the model y = arm + lab + lab×arm + unit + residual, run the test the formula describes, and
 * count rejections. With every lab running both arms that test is the one-sample t test of the L
 * within-lab differences of arm means (df L − 1; for balanced data it is also the maximal mixed
 * model's test when σ²_lab×arm is estimated above 0). With one arm per lab it is Student's t test on
 * the 2L lab means (df 2(L − 1)). The share rejected must lie within 3 binomial SEs of the formula's
 * power over 2000 experiments (SE ≈ 0.011 at p = 0.6, so the band is about ± 0.033).
 */

const EXPERIMENTS = 2000

function normalFrom(random: () => number): () => number {
  return () => {
    let u = 0
    while (u === 0) u = random()
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random())
  }
}

/** Mean of one lab × arm: k units, each the mean of m observations. */
function labArmMean(
  shift: number,
  k: number,
  m: number,
  sdUnit: number,
  sdResid: number,
  normal: () => number,
) {
  let sum = 0
  for (let u = 0; u < k; u++) {
    const unit = shift + sdUnit * normal()
    let obs = 0
    for (let j = 0; j < m; j++) obs += unit + sdResid * normal()
    sum += obs / m
  }
  return sum / k
}

function tTestP(values: number[], against: number[] | null): number {
  const mean = (v: number[]) => v.reduce((s, x) => s + x, 0) / v.length
  const ss = (v: number[]) => {
    const c = mean(v)
    return v.reduce((s, x) => s + (x - c) ** 2, 0)
  }
  if (against === null) {
    const df = values.length - 1
    const t = mean(values) / Math.sqrt(ss(values) / df / values.length)
    return studentTTwoSidedP(t, df)
  }
  const df = values.length + against.length - 2
  const pooled = (ss(values) + ss(against)) / df
  const t = (mean(values) - mean(against)) / Math.sqrt(pooled * (1 / values.length + 1 / against.length))
  return studentTTwoSidedP(t, df)
}

describe('threeLevelPower against simulated experiments', () => {
  it('every lab runs both arms: the paired test over labs rejects as often as planned', () => {
    // Invented: 5 labs, 3 mice per lab and arm, 15 cells each; labs differ in their response (σ²_lab×arm 4).
    const p = { labs: 5, k: 3, m: 15, lab: 25, labArm: 4, unit: 9, resid: 100, delta: 7 }
    const planned = threeLevelPower({
      labs: p.labs,
      unitsPerLabArm: p.k,
      obsPerUnit: p.m,
      labArmVariance: p.labArm,
      unitVariance: p.unit,
      residualVariance: p.resid,
      difference: p.delta,
    }).power
    const normal = normalFrom(seedrandom('three-level-every-arm'))
    let rejected = 0
    for (let e = 0; e < EXPERIMENTS; e++) {
      const differences: number[] = []
      for (let l = 0; l < p.labs; l++) {
        const lab = Math.sqrt(p.lab) * normal()
        const arm0 = labArmMean(
          lab + Math.sqrt(p.labArm) * normal(),
          p.k,
          p.m,
          Math.sqrt(p.unit),
          Math.sqrt(p.resid),
          normal,
        )
        const arm1 = labArmMean(
          lab + p.delta + Math.sqrt(p.labArm) * normal(),
          p.k,
          p.m,
          Math.sqrt(p.unit),
          Math.sqrt(p.resid),
          normal,
        )
        differences.push(arm1 - arm0)
      }
      if (tTestP(differences, null) < 0.05) rejected++
    }
    const se = Math.sqrt((planned * (1 - planned)) / EXPERIMENTS)
    expect(planned).toBeGreaterThan(0.3)
    expect(planned).toBeLessThan(0.9)
    expect(
      Math.abs(rejected / EXPERIMENTS - planned),
      `planned ${planned}, simulated ${rejected / EXPERIMENTS}`,
    ).toBeLessThan(3 * se)
  })

  it('each lab runs one arm: the test on lab means rejects as often as planned', () => {
    const p = { labs: 4, k: 3, m: 10, lab: 6, labArm: 2, unit: 9, resid: 100, delta: 6 }
    const planned = threeLevelPower({
      design: 'one-arm',
      labs: p.labs,
      unitsPerLabArm: p.k,
      obsPerUnit: p.m,
      labVariance: p.lab,
      labArmVariance: p.labArm,
      unitVariance: p.unit,
      residualVariance: p.resid,
      difference: p.delta,
    }).power
    const normal = normalFrom(seedrandom('three-level-one-arm'))
    const labSd = Math.sqrt(p.lab + p.labArm)
    let rejected = 0
    for (let e = 0; e < EXPERIMENTS; e++) {
      const control: number[] = []
      const treated: number[] = []
      for (let l = 0; l < p.labs; l++) {
        control.push(labArmMean(labSd * normal(), p.k, p.m, Math.sqrt(p.unit), Math.sqrt(p.resid), normal))
        treated.push(
          labArmMean(p.delta + labSd * normal(), p.k, p.m, Math.sqrt(p.unit), Math.sqrt(p.resid), normal),
        )
      }
      if (tTestP(treated, control) < 0.05) rejected++
    }
    const se = Math.sqrt((planned * (1 - planned)) / EXPERIMENTS)
    expect(planned).toBeGreaterThan(0.3)
    expect(planned).toBeLessThan(0.9)
    expect(
      Math.abs(rejected / EXPERIMENTS - planned),
      `planned ${planned}, simulated ${rejected / EXPERIMENTS}`,
    ).toBeLessThan(3 * se)
  })
})
