import type {
  AgreementFlag,
  AgreementLab,
  AgreementResult,
  AgreementTest,
  LabEffect,
} from '../schemas/agreement'
import { cochranTest } from '../stats/cochran-test'
import { EngineInputError } from '../stats/engine-input-error'
import { grubbsTest } from '../stats/grubbs-test'
import { labPrecision } from '../stats/lab-precision'
import type { LabSummary } from '../stats/lab-summaries'
import { mandelH } from '../stats/mandel-h'
import { mandelK } from '../stats/mandel-k'
import { fUpperP } from '../stats/reml/f-upper-p'
import { studentTQuantile } from '../stats/student-t-quantile'
import type { NestedColumns } from '../stats/types'

/**
 * Agreement between the units of the outermost level ("labs"), computed on the nested data:
 *
 * - A lab's independent results are the means of its units one level in (mice), per condition;
 *   per-lab means get t intervals on those unit means (df = units − 1), the "summarise first"
 *   interval that is cluster-correct for one lab (Lord et al. 2020, J Cell Biol 219:e202001064).
 * - ISO 5725-2 treats each condition like one material level; we pool the conditions inside a lab:
 *   s_r is the SD of unit means around their lab's condition means (pooled over labs by labPrecision),
 *   s_L the between-lab SD of the labs' levels, s_R = √(s_L² + s_r²), r = 2.8 s_r, R = 2.8 s_R.
 * - Spread is checked twice with Mandel's k and Cochran's C: between units inside a lab, and
 *   between observations inside units (residual df = observations − units). The second is where a
 *   lab with noisier measurements shows; observations inside one unit are independent given it.
 * - Mandel's h and Grubbs' test on the labs' levels.
 * - Lab × condition: each lab's effect as the difference of its unit means (Student's t, pooled),
 *   and the interaction F of a two-way fixed-effects ANOVA on unit means, full (lab × condition cell
 *   means) against additive (lab + condition) least squares (the standard model comparison for
 *   unbalanced two-way layouts, e.g. Searle 1987, Linear Models for Unbalanced Data, ch. 4).
 */

interface Cell {
  lab: number
  unit: string
  condition: number
  n: number
  sum: number
  sumSquares: number
}

const mean = (values: number[]) => values.reduce((a, b) => a + b, 0) / values.length

function tInterval(values: number[]): { ciLow: number | null; ciHigh: number | null } {
  if (values.length < 2) return { ciLow: null, ciHigh: null }
  const m = mean(values)
  const sd = Math.sqrt(values.reduce((s, v) => s + (v - m) ** 2, 0) / (values.length - 1))
  const half = studentTQuantile(0.975, values.length - 1) * (sd / Math.sqrt(values.length))
  return { ciLow: m - half, ciHigh: m + half }
}

/** Solves the least-squares normal equations XᵀX b = Xᵀy by Gauss–Jordan (small, well-posed here). */
function residualSumOfSquares(rows: number[][], y: number[]): number {
  const p = rows[0].length
  const a = Array.from({ length: p }, () => new Array<number>(p + 1).fill(0))
  rows.forEach((x, r) => {
    for (let i = 0; i < p; i++) {
      for (let j = 0; j < p; j++) a[i][j] += x[i] * x[j]
      a[i][p] += x[i] * y[r]
    }
  })
  for (let c = 0; c < p; c++) {
    let pivot = c
    for (let r = c + 1; r < p; r++) if (Math.abs(a[r][c]) > Math.abs(a[pivot][c])) pivot = r
    ;[a[c], a[pivot]] = [a[pivot], a[c]]
    if (Math.abs(a[c][c]) < 1e-12) throw new EngineInputError('The lab × condition layout has an empty cell.')
    for (let r = 0; r < p; r++) {
      if (r === c) continue
      const f = a[r][c] / a[c][c]
      for (let j = c; j <= p; j++) a[r][j] -= f * a[c][j]
    }
  }
  const b = a.map((row, i) => row[p] / row[i])
  return rows.reduce((s, x, r) => s + (y[r] - x.reduce((t, v, i) => t + v * b[i], 0)) ** 2, 0)
}

const FLAG_WORDS: Record<AgreementFlag, string> = {
  ok: 'within the usual range',
  straggler: 'unusual (beyond the 5 % critical value)',
  outlier: 'very unusual (beyond the 1 % critical value)',
}

export function labAgreement(
  columns: NestedColumns,
  options: { reference?: string | null } = {},
): Omit<AgreementResult, 'analysisId' | 'versionNo'> {
  if (columns.levels.length < 2) {
    throw new EngineInputError(
      'Agreement between labs needs a level inside the outermost one (e.g. lab > mouse).',
    )
  }
  const [labFactor, unitFactor] = columns.levels
  const inner = columns.levels.slice(1)
  const condition = columns.factors?.[0] ?? null
  const conditionLabels = condition ? condition.labels : ['all']
  const cells = new Map<string, Cell>()
  const { response } = columns
  for (let i = 0; i < response.length; i++) {
    const y = response[i]
    if (Number.isNaN(y)) continue
    const lab = labFactor.codes[i]
    const cond = condition ? condition.codes[i] : 0
    if (lab < 0 || cond < 0 || unitFactor.codes[i] < 0) continue
    // Units keyed by their full path inside the lab, so "m1" of two labs are two units.
    const unit = `${lab}/${unitFactor.codes[i]}`
    const key = `${unit}|${cond}`
    let cell = cells.get(key)
    if (!cell) cells.set(key, (cell = { lab, unit, condition: cond, n: 0, sum: 0, sumSquares: 0 }))
    cell.n++
    cell.sum += y
    cell.sumSquares += y * y
  }
  const labCodes = [...new Set([...cells.values()].map((c) => c.lab))].sort((a, b) => a - b)
  const condCodes = [...new Set([...cells.values()].map((c) => c.condition))].sort((a, b) => a - b)
  if (labCodes.length < 3)
    throw new EngineInputError(`Agreement between labs needs at least 3 labs, got ${labCodes.length}.`)

  const labs: AgreementLab[] = []
  const betweenSummaries: LabSummary[] = []
  const withinSummaries: LabSummary[] = []
  const unitMeansByLabCond = new Map<string, number[]>()
  for (const lab of labCodes) {
    const own = [...cells.values()].filter((c) => c.lab === lab)
    const byCondition = condCodes
      .map((cond) => {
        const here = own.filter((c) => c.condition === cond)
        if (!here.length) return null
        const means = here.map((c) => c.sum / c.n)
        unitMeansByLabCond.set(`${lab}|${cond}`, means)
        return {
          condition: conditionLabels[cond],
          mean: mean(means),
          ...tInterval(means),
          nUnits: here.length,
          nObs: here.reduce((s, c) => s + c.n, 0),
        }
      })
      .filter((x) => x !== null)
    let ssBetween = 0
    let ssWithin = 0
    for (const c of own) {
      const group = byCondition.find((g) => g.condition === conditionLabels[c.condition])!
      ssBetween += (c.sum / c.n - group.mean) ** 2
      ssWithin += c.sumSquares - (c.sum * c.sum) / c.n
    }
    const nObs = own.reduce((s, c) => s + c.n, 0)
    const dfBetweenUnits = own.length - byCondition.length
    const dfWithinUnits = nObs - own.length
    const sdBetweenUnits = dfBetweenUnits > 0 ? Math.sqrt(ssBetween / dfBetweenUnits) : null
    const sdWithinUnits = dfWithinUnits > 0 ? Math.sqrt(Math.max(0, ssWithin) / dfWithinUnits) : null
    const level = mean(byCondition.map((g) => g.mean))
    labs.push({
      label: labFactor.labels[lab],
      nUnits: new Set(own.map((c) => c.unit)).size,
      nObs,
      level,
      byCondition,
      sdBetweenUnits,
      dfBetweenUnits,
      sdWithinUnits,
      dfWithinUnits,
      h: 0,
      hFlag: 'ok',
      kBetweenUnits: null,
      kBetweenFlag: null,
      kWithinUnits: null,
      kWithinFlag: null,
    })
    // n = df + 1 so that the engine's (n − 1) weights and degrees of freedom are the right ones.
    betweenSummaries.push({ n: dfBetweenUnits + 1, mean: level, sd: sdBetweenUnits ?? 0 })
    withinSummaries.push({ n: dfWithinUnits + 1, mean: level, sd: sdWithinUnits ?? 0 })
  }

  const notes: string[] = []
  const tests: AgreementTest[] = []
  const h = mandelH(labs.map((l) => ({ n: 1, mean: l.level, sd: 0 })))
  labs.forEach((l, i) => {
    l.h = h.h[i]
    l.hFlag = h.flags[i]
  })
  if (labs.length === 3) {
    notes.push('With 3 labs, |h| cannot exceed 1.155, so h flags only a lab far from two close ones.')
  }
  const grubbs = grubbsTest(labs.map((l) => l.level))
  const gSide = grubbs.high.g >= grubbs.low.g ? grubbs.high : grubbs.low
  const gLab = labs[gSide.index].label
  tests.push({
    name: 'Grubbs (lab levels)',
    statistic: gSide.g,
    critical: grubbs.critical,
    flag: gSide.flag,
    lab: gLab,
    sentence:
      gSide.flag === 'ok'
        ? `No lab's level stands out (Grubbs: the most distant, ${gLab}, is ${FLAG_WORDS.ok}).`
        : `${gLab}'s level is ${gSide === grubbs.high ? 'unusually high' : 'unusually low'} (Grubbs' test, beyond the ${gSide.flag === 'outlier' ? '1' : '5'} % critical value).`,
  })

  let kBetween: ReturnType<typeof mandelK> | null = null
  if (betweenSummaries.every((s) => s.n >= 2) && betweenSummaries.some((s) => s.sd > 0)) {
    kBetween = mandelK(betweenSummaries)
    labs.forEach((l, i) => {
      l.kBetweenUnits = kBetween!.k[i]
      l.kBetweenFlag = kBetween!.flags[i]
    })
    const c = cochranTest(betweenSummaries)
    tests.push(spreadTest('Cochran (units inside a lab)', c, labs[c.index].label, 'units (their means)'))
  } else {
    notes.push('Some lab has too few units for a spread between units; that check is left out.')
  }
  let kWithin: ReturnType<typeof mandelK> | null = null
  if (withinSummaries.every((s) => s.n >= 2) && withinSummaries.some((s) => s.sd > 0)) {
    kWithin = mandelK(withinSummaries)
    labs.forEach((l, i) => {
      l.kWithinUnits = kWithin!.k[i]
      l.kWithinFlag = kWithin!.flags[i]
    })
    const c = cochranTest(withinSummaries)
    tests.push(
      spreadTest('Cochran (observations inside units)', c, labs[c.index].label, 'observations inside a unit'),
    )
  }
  if (
    !betweenSummaries.every((s) => s.n === betweenSummaries[0].n) ||
    !withinSummaries.every((s) => s.n === withinSummaries[0].n)
  ) {
    notes.push(
      'Labs differ in their numbers of results; k and Cochran use the average number (ISO 5725-2 practice for nearly balanced data).',
    )
  }

  const precision = labPrecision(betweenSummaries)

  let effect: AgreementResult['effect'] = null
  if (condition && condCodes.length >= 2) {
    const referenceCode =
      options.reference != null && condition.labels.includes(options.reference)
        ? condition.labels.indexOf(options.reference)
        : condCodes[0]
    const other = condCodes.find((c) => c !== referenceCode)!
    const perLab: LabEffect[] = []
    labCodes.forEach((lab, i) => {
      const a = unitMeansByLabCond.get(`${lab}|${other}`)
      const b = unitMeansByLabCond.get(`${lab}|${referenceCode}`)
      if (!a || !b || a.length + b.length < 3) return
      const df = a.length + b.length - 2
      const ss = [a, b].reduce((s, g) => {
        const m = mean(g)
        return s + g.reduce((t, v) => t + (v - m) ** 2, 0)
      }, 0)
      const se = Math.sqrt((ss / df) * (1 / a.length + 1 / b.length))
      const estimate = mean(a) - mean(b)
      const half = studentTQuantile(0.975, df) * se
      perLab.push({
        lab: labs[i].label,
        estimate,
        se,
        df,
        ciLow: estimate - half,
        ciHigh: estimate + half,
        nUnits: a.length + b.length,
      })
    })
    const unitsCarryBoth = new Set([...cells.values()].map((c) => c.unit)).size < cells.size
    let interaction: NonNullable<AgreementResult['effect']>['interaction'] = null
    let note: string | null = null
    if (unitsCarryBoth) {
      note =
        'Units carry more than one condition here, so the interaction test on unit means (which treats them as independent) is left out; compare the per-lab effects.'
    } else {
      interaction = interactionTest([...cells.values()], labCodes, condCodes)
    }
    if (condCodes.length > 2)
      note = `Per-lab effects compare ${conditionLabels[other]} with ${conditionLabels[referenceCode]}; the interaction test covers all conditions.`
    effect = {
      condition: conditionLabels[other],
      reference: conditionLabels[referenceCode],
      perLab,
      interaction,
      note,
    }
  }

  const findings: string[] = []
  for (const t of tests) if (t.flag !== 'ok') findings.push(t.sentence)
  for (const l of labs) {
    if (
      l.kWithinFlag &&
      l.kWithinFlag !== 'ok' &&
      !findings.some((f) => f.startsWith(`${l.label}'s spread`))
    ) {
      findings.push(
        `${l.label}'s spread of observations inside units is ${FLAG_WORDS[l.kWithinFlag]} (Mandel's k).`,
      )
    }
  }
  if (effect?.interaction) findings.push(effect.interaction.sentence)
  if (!findings.length) findings.push('The labs agree: no lab stands out in level or spread.')

  return {
    labLevel: labFactor.name,
    unitLevel: unitFactor.name,
    response: columns.responseName,
    condition: condition?.name ?? null,
    labs,
    precision: {
      sr: precision.sr,
      sL: precision.sL,
      sR: precision.sR,
      r: precision.r,
      R: precision.R,
      sLTruncated: precision.sLTruncated,
      grandMean: precision.grandMean,
    },
    mandel: {
      h: h.critical,
      kBetweenUnits: kBetween?.critical ?? null,
      kWithinUnits: kWithin?.critical ?? null,
    },
    tests,
    effect,
    findings,
    notes:
      inner.length > 1 ? [...notes, `Levels inside ${unitFactor.name} are averaged into its mean.`] : notes,
  }
}

function spreadTest(
  name: string,
  c: ReturnType<typeof cochranTest>,
  lab: string,
  what: string,
): AgreementTest {
  return {
    name,
    statistic: c.c,
    critical: c.critical,
    flag: c.flag,
    lab,
    sentence:
      c.flag === 'ok'
        ? `No lab's spread between ${what} stands out (Cochran: the largest, ${lab}, is ${FLAG_WORDS.ok}).`
        : `${lab}'s spread between ${what} is unusually large (Cochran's test, beyond the ${c.flag === 'outlier' ? '1' : '5'} % critical value).`,
  }
}

function interactionTest(cells: Cell[], labCodes: number[], condCodes: number[]) {
  const y = cells.map((c) => c.sum / c.n)
  const labIndex = new Map(labCodes.map((l, i) => [l, i]))
  const condIndex = new Map(condCodes.map((c, i) => [c, i]))
  const additive = cells.map((c) => {
    const row = [1]
    for (let i = 1; i < labCodes.length; i++) row.push(labIndex.get(c.lab) === i ? 1 : 0)
    for (let j = 1; j < condCodes.length; j++) row.push(condIndex.get(c.condition) === j ? 1 : 0)
    return row
  })
  const groups = new Map<string, number[]>()
  cells.forEach((c, i) => {
    const key = `${c.lab}|${c.condition}`
    ;(groups.get(key) ?? groups.set(key, []).get(key)!).push(y[i])
  })
  let rssFull = 0
  for (const values of groups.values()) {
    const m = mean(values)
    rssFull += values.reduce((s, v) => s + (v - m) ** 2, 0)
  }
  const df1 = (labCodes.length - 1) * (condCodes.length - 1)
  const df2 = cells.length - groups.size
  if (df2 < 1 || groups.size < labCodes.length * condCodes.length) return null
  const rssAdditive = residualSumOfSquares(additive, y)
  const f = Math.max(0, (rssAdditive - rssFull) / df1) / (rssFull / df2)
  const p = fUpperP(f, df1, df2)
  const pText = p < 0.001 ? 'p < 0.001' : `p = ${p.toFixed(3)}`
  return {
    f,
    df1,
    df2,
    p,
    sentence:
      p < 0.05
        ? `The labs disagree on the effect (lab × condition F = ${f.toFixed(2)}, ${pText}).`
        : `No sign that the labs disagree on the effect (lab × condition F = ${f.toFixed(2)}, ${pText}); with few units per lab this test has little power.`,
  }
}
