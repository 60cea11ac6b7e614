import type { AnalysisResult } from '../schemas/analysis-result'

/** An analysis's variance components put on the planner's three levels. */
export interface ThreeLevelComponents {
  /** The outer level (e.g. "lab") and how many units it had; null when the plan is for one lab. */
  outer: { name: string; nUnits: number; design: 'every-arm' | 'one-arm' } | null
  /** The level whose units were assigned to arms, e.g. "mouse". */
  unitLevel: string
  /** Between units of the same lab and arm. */
  unitVariance: number
  /** Everything inside a unit: deeper levels and the residual. */
  residualVariance: number
  /**
   * σ²_lab×arm of the outer level; null when the analysis has no such term (engine 0.1, or a term
   * left out because it coincided with another): unknown.
   */
  labArmVariance: number | null
  /** σ²_lab of the outer level (used when each lab runs one arm). */
  labVariance: number
  /** How the components were placed, in plain words (empty when there was nothing to say). */
  mapping: string[]
}

interface Placed {
  /** Index of the given level, or -1 for the residual. */
  level: number
  /** The factor crossed with the level, null for the level itself. */
  factor: string | null
  variance: number
  name: string
}

/**
 * Puts a result's variance components on the levels they belong to. Engine ≥ 0.2 names each
 * component after its random term (`model.random`: level and factor per term); engine 0.1 after
 * the level, plus "<level>:condition" for a level it added. Names are also read as lme4 groupings
 * ("lab:mouse" is the mouse level, "lab:treatment" the lab × treatment term) so either spelling works.
 */
function placeComponents(result: AnalysisResult, factor: string | null): Placed[] {
  const levels = result.levels.map((l) => l.name)
  const terms = new Map((result.model?.random ?? []).map((t) => [t.name, t]))
  return result.varianceComponents.map((c) => {
    if (c.level === 'residual') return { level: -1, factor: null, variance: c.variance, name: c.level }
    const term = terms.get(c.level)
    if (term) {
      return { level: levels.indexOf(term.level), factor: term.factor, variance: c.variance, name: c.level }
    }
    const direct = levels.indexOf(c.level)
    if (direct >= 0) return { level: direct, factor: null, variance: c.variance, name: c.level }
    const parts = c.level.split(':')
    const last = parts.at(-1)!
    if (parts.length > 1 && levels.includes(last) && parts.slice(0, -1).every((p) => levels.includes(p))) {
      return { level: levels.indexOf(last), factor: null, variance: c.variance, name: c.level }
    }
    const levelPart = levels.indexOf(parts[0])
    const factorPart = parts.slice(1).join(':')
    return {
      level: levelPart,
      factor: factorPart === 'condition' ? factor : factorPart,
      variance: c.variance,
      name: c.level,
    }
  })
}

/**
 * An analysis's variance components on the planner's three levels: outer level (labs, days,
 * plates), units per lab and arm (the level that carries the condition), observations per unit.
 *
 * - The condition is carried by a level below the outermost (animals within labs): every lab runs
 *   every arm. The outer level is the outermost level; σ²_lab×arm is its `<outer>:<factor>`
 *   component; the unit is the carrying level; the residual is everything inside the unit (deeper
 *   levels and the residual). Levels between the outer level and the unit hold every arm, so their
 *   own variance cancels from a comparison within labs and is left out; their × condition terms do
 *   not cancel and are counted with the units (as if every unit came from its own such group; when
 *   several units share one, the plan is optimistic).
 * - The outermost level carries the condition and has levels inside it: each lab runs one arm;
 *   σ²_lab is its component, the unit is the next level down.
 * - One level, or a condition that varies inside the innermost units: no outer level; the unit is
 *   the carrying level (else the innermost), its variance the unit level's ICC times the total
 *   (that level and every level above it, as the two-level planner always did), the residual the rest.
 *
 * With two factors the plan is for the first factor; terms of the second are left out. A result of
 * engine 0.1 has no lab × condition component: σ²_lab×arm is then null (unknown).
 * Null when the result has no levels.
 */
export function threeLevelComponents(result: AnalysisResult): ThreeLevelComponents | null {
  const levels = result.levels.map((l) => l.name)
  if (levels.length === 0) return null
  const factor = result.factors?.[0]?.name ?? result.condition
  const carrierName = result.factors?.[0]?.level ?? result.conditionLevel
  const carrier = carrierName === null ? -1 : levels.indexOf(carrierName)
  const placed = placeComponents(result, factor)
  const sum = (keep: (p: Placed) => boolean) => placed.filter(keep).reduce((s, p) => s + p.variance, 0)
  const ofFactor = (p: Placed) => p.factor === null || p.factor === factor
  const mapping: string[] = []
  if (placed.some((p) => p.factor !== null && p.factor !== factor)) {
    mapping.push(`The plan is for “${factor}”; the spread of the other factor's effect is left out.`)
  }
  const deeper = (from: number) => sum((p) => p.level === -1 || (p.level > from && ofFactor(p)))
  const deeperNames = (from: number) => levels.slice(from + 1)

  if (carrier >= 1) {
    const outer = levels[0]
    const unitLevel = levels[carrier]
    const middle = placed.filter((p) => p.level > 0 && p.level < carrier && p.factor === factor)
    const labArm = placed.find((p) => p.level === 0 && p.factor === factor)
    let labArmVariance: number | null = labArm ? labArm.variance : null
    if (!labArm && result.model) {
      const skipped = result.model.skipped.find((s) => s.name === `${outer}:${factor}`)
      mapping.push(
        skipped
          ? `How much the effect differs between ${outer}s could not be told apart from ${skipped.sameAs} in this analysis: it is unknown.`
          : `The analysis has no ${outer} × ${factor} term: how much the effect differs between ${outer}s is unknown.`,
      )
      labArmVariance = null
    } else if (!labArm) {
      mapping.push(
        `This analysis (engine ${result.engine.version}) did not estimate how much the effect differs between ${outer}s: it is unknown.`,
      )
    }
    if (middle.length) {
      mapping.push(
        `The ${middle.map((p) => p.name).join(', ')} spread is counted with the ${unitLevel} spread, as if each ${unitLevel} came from its own ${levels[middle[0].level]}; optimistic when they share one.`,
      )
    }
    if (deeperNames(carrier).length) {
      mapping.push(
        `The ${deeperNames(carrier).join(', ')} spread inside a ${unitLevel} is counted with the observations.`,
      )
    }
    return {
      outer: { name: outer, nUnits: result.levels[0].nUnits, design: 'every-arm' },
      unitLevel,
      unitVariance:
        sum((p) => p.level === carrier && p.factor === null) + middle.reduce((s, p) => s + p.variance, 0),
      residualVariance: deeper(carrier),
      labArmVariance,
      labVariance: sum((p) => p.level === 0 && p.factor === null),
      mapping,
    }
  }

  if (carrier === 0 && levels.length >= 2) {
    const outer = levels[0]
    if (deeperNames(1).length) {
      mapping.push(
        `The ${deeperNames(1).join(', ')} spread inside a ${levels[1]} is counted with the observations.`,
      )
    }
    return {
      outer: { name: outer, nUnits: result.levels[0].nUnits, design: 'one-arm' },
      unitLevel: levels[1],
      unitVariance: sum((p) => p.level === 1 && ofFactor(p)),
      residualVariance: deeper(1),
      labArmVariance: sum((p) => p.level === 0 && p.factor === factor),
      labVariance: sum((p) => p.level === 0 && p.factor === null),
      mapping,
    }
  }

  const unit = carrier === 0 ? 0 : levels.length - 1
  const total = sum(() => true)
  // As the two-level planner always did: the unit level's ICC (its components and all above) of the total.
  const between = (result.icc.find((e) => e.level === levels[unit])?.icc ?? 0) * total
  return {
    outer: null,
    unitLevel: levels[unit],
    unitVariance: between,
    residualVariance: total - between,
    labArmVariance: null,
    labVariance: 0,
    mapping,
  }
}
