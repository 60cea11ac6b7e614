import { EngineInputError } from './engine-input-error'
import type { NestedDesign, VarianceComponent } from './types'

export interface NestedAnovaLine {
  /** Level name, or 'residual'. */
  level: string
  df: number
  sumOfSquares: number
  meanSquare: number
  /** Observations per unit of this level (the coefficient of σ_l² in the expected mean squares). */
  unitSize: number
}

export interface NestedAnovaBalanced {
  /** One line per level, outermost first, then the residual. */
  table: NestedAnovaLine[]
  /** Method-of-moments variance components; can be negative (see `anyNegative`). */
  components: VarianceComponent[]
  /** True when some estimate is negative; REML then truncates it at 0 and the two disagree. */
  anyNegative: boolean
}

/**
 * Classic analysis of variance of a balanced, fully nested design (every unit of a level has the
 * same number of children, every innermost unit the same number of observations) and the
 * variance components from the expected mean squares. A cross-check of REML: on balanced data
 * the two agree whenever no estimate is negative.
 *
 *   SS_l = Σ_units n_l (ȳ_unit − ȳ_parent)²,  df_l = N_l − N_{l−1} (N_0 = 1),  MS = SS / df
 *   SS_e = Σ (y − ȳ_innermost unit)²,  df_e = n − N_K
 *   E[MS_l] = σ² + Σ_{m ≥ l} n_m σ_m²  ⇒  σ_K² = (MS_K − MS_e) / n_K,  σ_l² = (MS_l − MS_{l+1}) / n_l
 *
 * Source: Searle, Casella & McCulloch (1992), Variance Components, §4.2–4.3 (balanced nested
 * classifications); Sokal & Rohlf (1995), Biometry, ch. 10.
 *
 * Guard errors (EngineInputError): a design with a condition (this check is for variance
 * components only). Returns null when the design is not balanced.
 *
 * @example
 * anovaNestedBalanced(pastesDesign)!.components
 * // → [{ level: 'batch', variance: 1.6573 }, { level: 'cask', variance: 8.4337 }, { level: 'residual', variance: 0.678 }]
 */
export function anovaNestedBalanced(design: NestedDesign): NestedAnovaBalanced | null {
  if (design.factors.length > 0 || design.covariates.length > 0) {
    throw new EngineInputError('The balanced nested ANOVA check takes a design without condition.')
  }
  const levels = design.randomLevels
  const K = levels.length
  const { y, nObs } = design

  // Sizes: children per unit must be constant at every level, observations per innermost unit too.
  const obsPerUnit: number[] = []
  for (let l = 0; l < K; l++) {
    const count = new Float64Array(levels[l].nUnits)
    for (let i = 0; i < nObs; i++) count[levels[l].unitOfObs[i]]++
    if (!count.every((c) => c === count[0])) return null
    obsPerUnit.push(count[0])
  }
  for (let l = 1; l < K; l++) {
    const children = new Float64Array(levels[l - 1].nUnits)
    for (const parent of levels[l].parentOfUnit) children[parent]++
    if (!children.every((c) => c === children[0])) return null
  }

  const means = levels.map((level, l) => {
    const sum = new Float64Array(level.nUnits)
    for (let i = 0; i < nObs; i++) sum[level.unitOfObs[i]] += y[i]
    return sum.map((s) => s / obsPerUnit[l])
  })
  let grand = 0
  for (let i = 0; i < nObs; i++) grand += y[i]
  grand /= nObs

  const table: NestedAnovaLine[] = levels.map((level, l) => {
    let ss = 0
    for (let u = 0; u < level.nUnits; u++) {
      const parentMean = l === 0 ? grand : means[l - 1][level.parentOfUnit[u]]
      ss += obsPerUnit[l] * (means[l][u] - parentMean) ** 2
    }
    const df = level.nUnits - (l === 0 ? 1 : levels[l - 1].nUnits)
    return { level: level.name, df, sumOfSquares: ss, meanSquare: ss / df, unitSize: obsPerUnit[l] }
  })
  let sse = 0
  const inner = levels[K - 1]
  for (let i = 0; i < nObs; i++) sse += (y[i] - means[K - 1][inner.unitOfObs[i]]) ** 2
  const dfe = nObs - inner.nUnits
  table.push({ level: 'residual', df: dfe, sumOfSquares: sse, meanSquare: sse / dfe, unitSize: 1 })

  const components: VarianceComponent[] = levels.map((level, l) => ({
    level: level.name,
    variance: (table[l].meanSquare - table[l + 1].meanSquare) / obsPerUnit[l],
  }))
  components.push({ level: 'residual', variance: table[K].meanSquare })
  return { table, components, anyNegative: components.some((c) => c.variance < 0) }
}
