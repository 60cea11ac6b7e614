/**
 * End-to-end: `nestwise plan` with an outer level (--labs), spawned as a user would run it, on
 * typed-in numbers and on a saved analysis of the invented fixture table.
 */
import { spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import { planThreeLevel } from '../../shared/stats/plan-three-level'

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..')

function nestwise(...args: string[]) {
  const run = spawnSync(process.execPath, ['scripts/run-nestwise.mjs', ...args], {
    cwd: root,
    encoding: 'utf8',
  })
  return { code: run.status, stdout: run.stdout, stderr: run.stderr }
}

// Each test spawns the command line (the first may rebuild its bundle): slow on a busy machine.
const SPAWNING = { timeout: 180_000 }

describe('nestwise plan --labs', SPAWNING, () => {
  it('gives the power of the WebPower multisite example (wp.mrt2arm: 0.8583253) with the ceiling of its sites', () => {
    // WebPower documentation, wp.mrt2arm(n = 45, f = 0.5, J = 20, tau11 = 0.5, sg2 = 1.25) → 0.8583253.
    // n = 45 persons per site is not a whole number per arm; with 22 per arm (n = 44) R gives
    // 1 − pt(qt(.975, 19), 19, λ) + pt(−qt(.975, 19), 19, λ), λ = √20·0.5/√(4/44 + 0.4) = 0.8569229 (R 4.x).
    const run = nestwise(
      'plan',
      '--difference',
      String(0.5 * Math.sqrt(1.25)),
      '--icc',
      '0',
      '--variance',
      '1.25',
      '--labs',
      '20',
      '--lab-arm-variance',
      '0.25',
      '--units',
      '22',
      '--obs',
      '1',
    )
    expect(run.stderr).toBe('')
    expect(run.code).toBe(0)
    const plan = JSON.parse(run.stdout)
    expect(plan.power).toMatchObject({ labs: 20, unitsPerLabArm: 22, obsPerUnit: 1, df: 19 })
    expect(plan.power.power).toBeCloseTo(0.8569229, 6)
    expect(plan.power.ceilingPower).toBeGreaterThan(plan.power.power)
    expect(plan.inputs.labs).toMatchObject({
      labArmVariance: 0.25,
      labArmVarianceSource: 'given',
      design: 'every-arm',
    })
  })

  it('finds the cheapest labs, units per lab and observations per unit over a range of labs', () => {
    const run = nestwise(
      'plan',
      '--difference',
      '8',
      '--icc',
      String(20 / 120),
      '--variance',
      '120',
      '--labs',
      '2-12',
      '--lab-arm-variance',
      '2',
      '--cost-lab',
      '2000',
      '--cost-unit',
      '100',
      '--cost-obs',
      '1',
    )
    expect(run.stderr).toBe('')
    const plan = JSON.parse(run.stdout)
    // The same numbers straight into the engine (checked by brute force in shared/stats/plan-three-level.test.ts).
    const direct = planThreeLevel({
      labArmVariance: 2,
      unitVariance: 20,
      residualVariance: 100,
      difference: 8,
      minLabs: 2,
      maxLabs: 12,
      costPerLab: 2000,
      costPerUnit: 100,
      costPerObs: 1,
    })
    expect(plan.cheapestDesign).toMatchObject({
      labs: direct.labs,
      unitsPerLabArm: direct.unitsPerLabArm,
      obsPerUnit: direct.obsPerUnit,
      cost: direct.cost,
    })
    expect(plan.costOptimal.unitsPerLab.exact).toBeGreaterThan(0)
  })

  it('takes the spread inside labs from a saved analysis and flags the unknown lab × condition variance', () => {
    const folder = mkdtempSync(join(tmpdir(), 'nestwise-plan-labs-'))
    try {
      const saved = join(folder, 'result.json')
      const analysis = nestwise(
        'analyze',
        join('tests', 'fixtures', 'cli', 'cells.csv'),
        '--response',
        'neurite_length_um',
        '--levels',
        'lab,mouse',
        '--condition',
        'treatment',
      )
      expect(analysis.code, analysis.stderr).toBe(0)
      writeFileSync(saved, analysis.stdout)
      const result = JSON.parse(analysis.stdout)
      const component = (name: string) =>
        result.varianceComponents.find((c: { level: string }) => c.level === name)?.variance ?? 0
      const labArm = result.varianceComponents.find((c: { level: string }) => c.level === 'lab:treatment')
      const run = nestwise(
        'plan',
        '--from',
        saved,
        '--difference',
        '5',
        '--labs',
        '4',
        '--units',
        '3',
        '--obs',
        '20',
      )
      expect(run.stderr).toBe('')
      expect(run.code).toBe(0)
      const plan = JSON.parse(run.stdout)
      // The lab variance cancels within labs: the spread inside a lab and arm is mouse + residual.
      const mouse = component('mouse') + component('lab:mouse')
      expect(plan.inputs.sdTotal).toBeCloseTo(Math.sqrt(mouse + component('residual')), 9)
      expect(plan.inputs.iccSource).toEqual({ kind: 'analysis', level: 'mouse' })
      if (labArm) {
        expect(plan.inputs.labs).toMatchObject({
          labArmVariance: labArm.variance,
          labArmVarianceSource: 'analysis',
        })
      } else {
        expect(plan.inputs.labs).toMatchObject({ labArmVariance: 0, labArmVarianceSource: 'unknown' })
      }
      expect(plan.power.df).toBe(3)
    } finally {
      rmSync(folder, { recursive: true, force: true })
    }
  })

  it('explains the new options under --help and refuses one lab with a lab × condition variance', () => {
    const help = nestwise('plan', '--help')
    expect(help.stdout).toContain('--labs L | --labs L1-L2')
    expect(help.stdout).toContain('--lab-arm-variance V')
    expect(help.stdout).toContain('--cost-lab C')
    const one = nestwise(
      'plan',
      '--difference',
      '1',
      '--icc',
      '0.1',
      '--sd',
      '2',
      '--labs',
      '1',
      '--lab-arm-variance',
      '1',
      '--units',
      '4',
      '--obs',
      '5',
    )
    expect(one.code).toBe(2)
    expect(one.stderr).toMatch(/^nestwise: .*with one lab, how much labs differ/)
  })
})
