import { hasCosts, type PlanSummary } from '../../../shared/schemas/plans'
import { resolveSpread } from '../../../shared/planning/resolve-spread'
import { formatNumber } from '../../../shared/report/number-format'
import { pluralOf } from './unit-words'

/** One saved plan as lines of text for the summary table (share page and printed report). */
export interface PlanSummaryRow {
  key: string
  name: string
  createdAt: string
  /** The numbers the plan started from, each a short phrase. */
  assumptions: string[]
  /** Costs and limits the plan was held to. */
  constraints: string[]
  /** "4 labs", "3 plates per arm"; null for a plan for one lab. */
  labs: string | null
  unitsPerArm: string
  /** "224 in all" */
  totalUnits: string
  obsPerUnit: string
  totalObs: string
  power: string
  cost: string
  /** Set when no design within the limits reached the target power. */
  shortfall: string | null
}

export const percent = (v: number): string => `${(v * 100).toFixed(v > 0.995 && v < 1 ? 1 : 0)} %`
/** Whole numbers with thousands separators: costs and totals ("100,352"). */
export const money = (v: number): string =>
  new Intl.NumberFormat('en-US', { maximumFractionDigits: 0 }).format(v)
/** A cost, or "—" for a plan without costs (it counts units instead). */
export const costText = (v: number | null): string => (v === null ? '—' : money(v))

function spreadWords(inputs: PlanSummary['inputs'], unitWord: string): { icc: number; sd: string } {
  const { icc } = resolveSpread(inputs)
  const { spread } = inputs
  const sd =
    spread.kind === 'total'
      ? `SD ${formatNumber(spread.sdTotal)}`
      : `SD between ${pluralOf(unitWord)} ${formatNumber(spread.sdBetween)}, within a ${unitWord} ${formatNumber(spread.sdWithin)}`
  return { icc, sd }
}

/** True when a saved plan spans more than one lab (or one arm per lab). */
export function isMultiLab(plan: PlanSummary): boolean {
  return plan.inputs.outer.design === 'one-arm' || plan.inputs.outer.maxLabs > 1
}

const count = (n: number, word: string) => `${n} ${n === 1 ? word : pluralOf(word)}`

/** The outer level's numbers in words: its spread, and the labs and cost it was held to. */
function outerWords(plan: PlanSummary): { assumption: string; constraints: string[] } {
  const { outer } = plan.inputs
  const outers = pluralOf(outer.name)
  const assumption =
    outer.design === 'one-arm'
      ? `SD between ${outers} ${outer.sdBetweenLabs === null ? 'unknown (planned as 0)' : formatNumber(outer.sdBetweenLabs)}, one arm per ${outer.name}`
      : `effect SD between ${outers} ${outer.effectSd === null ? 'unknown (planned as 0)' : formatNumber(outer.effectSd)}`
  const range =
    outer.minLabs === outer.maxLabs
      ? count(outer.minLabs, outer.name)
      : `${outer.minLabs} to ${outer.maxLabs} ${outers}`
  return {
    assumption,
    constraints: [
      `${range}${outer.design === 'one-arm' ? ' per arm' : ''}`,
      ...(outer.costPerLab === null || !hasCosts(plan.inputs)
        ? []
        : [`cost ${money(outer.costPerLab)} per ${outer.name}`]),
    ],
  }
}

export function planSummaryRow(plan: PlanSummary, unitWord: string, index = 0): PlanSummaryRow {
  const { inputs, result } = plan
  const spread = spreadWords(inputs, unitWord)
  const multiLab = isMultiLab(plan)
  const outer = multiLab ? outerWords(plan) : null
  const constraints = [
    ...(outer?.constraints ?? []),
    hasCosts(inputs)
      ? `cost ${money(inputs.costPerUnit ?? 0)} per ${unitWord} + ${money(inputs.costPerObs ?? 0)} per observation`
      : `no costs: the fewest ${pluralOf(unitWord)}`,
  ]
  if (inputs.maxUnitsPerArm !== null)
    constraints.push(
      `at most ${inputs.maxUnitsPerArm} ${pluralOf(unitWord)} per ${multiLab ? `${inputs.outer.name} and arm` : 'arm'}`,
    )
  if (inputs.maxObsPerUnit !== null)
    constraints.push(`at most ${inputs.maxObsPerUnit} observations per ${unitWord}`)
  return {
    key: `${index}-${plan.createdAt}`,
    name: plan.name,
    createdAt: plan.createdAt,
    assumptions: [
      `ICC ${spread.icc.toFixed(2)}`,
      spread.sd,
      ...(outer ? [outer.assumption] : []),
      `difference that matters ${formatNumber(inputs.difference)}`,
      `${inputs.arms} arms, α ${inputs.alpha}, target power ${percent(inputs.targetPower)}`,
    ],
    constraints,
    labs: multiLab
      ? `${count(result.labs, inputs.outer.name)}${result.design === 'one-arm' ? ' per arm' : ''}`
      : null,
    unitsPerArm: String(result.unitsPerArm),
    totalUnits: `${money(result.totalUnits)} in all`,
    obsPerUnit: String(result.obsPerUnit),
    totalObs: `${money(result.totalObs)} in all`,
    power: percent(result.power),
    cost: costText(result.cost),
    shortfall: result.feasible
      ? null
      : `No design within the limits reaches ${percent(inputs.targetPower)}; this is the most powerful one.`,
  }
}

/** Oldest plan first, so the list reads in the order the plans were made. */
export function planSummaryRows(plans: PlanSummary[], unitWord: string): PlanSummaryRow[] {
  return [...plans]
    .sort((a, b) => a.createdAt.localeCompare(b.createdAt))
    .map((plan, index) => planSummaryRow(plan, unitWord, index))
}
