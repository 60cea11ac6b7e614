import type {
  ColumnType,
  ConditionPlacement,
  ExclusionRule,
  RuleOperator,
} from '../../../shared/schemas/datasets'
import { formatCount } from './format'

/** Where the condition changes, in a few words for a chip ("between mouse units, within lab"). */
export function placementWords(
  placement: ConditionPlacement | null,
  conditionLevel: string | null,
  levels: readonly string[],
): string | null {
  if (!placement) return null
  if (placement === 'within-innermost') {
    const inner = levels[levels.length - 1]
    return inner ? `within each “${inner}” unit` : 'within units'
  }
  if (!conditionLevel) return null
  if (placement === 'between-top') return `between “${conditionLevel}” units`
  const depth = levels.indexOf(conditionLevel)
  const parent = depth > 0 ? levels[depth - 1] : null
  return parent
    ? `between “${conditionLevel}” units, within “${parent}”`
    : `between “${conditionLevel}” units`
}

export const columnTypeWords: Record<ColumnType, { label: string; hint: string }> = {
  integer: { label: 'Whole numbers', hint: 'Every value is a whole number.' },
  numeric: { label: 'Numbers', hint: 'Every value is a number (decimals allowed).' },
  text: { label: 'Text', hint: 'Labels or words; at least one value is not a number.' },
  empty: { label: 'Empty', hint: 'The column has no values at all.' },
}

export function isNumericType(type: ColumnType): boolean {
  return type === 'integer' || type === 'numeric'
}

export const operatorWords: Record<RuleOperator, string> = {
  eq: 'equals',
  ne: 'is not',
  lt: 'is less than',
  le: 'is at most',
  gt: 'is greater than',
  ge: 'is at least',
  missing: 'is missing',
}

/** Operators that make sense for a column of this type (text compares only for equality). */
export function operatorsFor(type: ColumnType): RuleOperator[] {
  return isNumericType(type) ? ['eq', 'ne', 'lt', 'le', 'gt', 'ge', 'missing'] : ['eq', 'ne', 'missing']
}

/** “neurite_length_um” is greater than 150 */
export function ruleWords(rule: ExclusionRule): string {
  const head = `“${rule.column}” ${operatorWords[rule.operator]}`
  if (rule.operator === 'missing' || rule.value === null) return head
  return typeof rule.value === 'number' ? `${head} ${rule.value}` : `${head} “${rule.value}”`
}

/** lab “nimbus” › mouse “m2” */
export function unitWords(path: readonly { column: string; value: string }[]): string {
  return path.map((step) => `${step.column} “${step.value}”`).join(' › ')
}

/** The first few labels and how many more there are: "M1, M2, M3, M4, M5 and 3 more". */
export function labelList(labels: readonly string[], total = labels.length): string {
  const more = total - labels.length
  return more > 0 ? `${labels.join(', ')} and ${more} more` : labels.join(', ')
}

/** A response column's empty cells among the kept rows, as the nesting summary says them. */
export function missingValueWords(column: string, rows: number): string {
  return `${formatCount(rows)} ${rows === 1 ? 'row has' : 'rows have'} no value in “${column}”: analyses of it leave ${rows === 1 ? 'that row' : 'those rows'} out, so they count fewer observations than this table.`
}
