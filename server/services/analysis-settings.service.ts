import type { AnalysisDefaults, AnalysisSettings, AnalysisSettingsPatch } from '../../shared/schemas/analyses'
import type { ColumnProfile, Tagging } from '../../shared/schemas/datasets'
import { applySettingsChange } from '../../shared/analysis/apply-settings-change'
import { areYesNoLabels, defaultPositiveLabel } from '../../shared/analysis/binary-response'
import { InvalidPayloadError } from '../errors/app-error'

const q = (name: string) => `“${name}”`

export interface TaggingDefaultsInput {
  tagging: Pick<Tagging, 'responseColumns' | 'conditionColumn' | 'levels'> | null
  /** The version's column profiles: they tell whether the response is a text column. */
  columns: readonly ColumnProfile[]
  /**
   * The two values of yes/no columns when known better than the profile knows them (the kept rows
   * of a column whose file holds a third value only in excluded rows).
   */
  binaryColumns?: Record<string, string[]>
}

/**
 * Settings from a version's tagging: its first response, its condition (if any) and levels, the
 * defaults for the rest. A text response with two values (from `binaryColumns`, else its profile;
 * tagging accepts text only as yes/no or as numbers with stray text in excluded rows) starts as
 * binomial, its value counted as yes chosen as the settings form would (defaultPositiveLabel); any
 * other response starts as a normal one, whatever its values.
 */
export function settingsFromTagging({
  tagging,
  columns,
  binaryColumns,
}: TaggingDefaultsInput): AnalysisSettings | null {
  if (!tagging || !tagging.responseColumns.length || !tagging.levels.length) return null
  const response = tagging.responseColumns[0]
  const profile = columns.find((c) => c.name === response)
  const labels =
    profile?.type === 'text' ? (binaryColumns ?? responseKinds([profile]).binaryColumns)[response] : undefined
  const change = applySettingsChange(null, {
    response,
    conditions: tagging.conditionColumn ? [tagging.conditionColumn] : [],
    levels: tagging.levels,
    ...(labels ? { family: 'binomial' as const, positive: defaultPositiveLabel(labels) } : {}),
  })
  // A tagging names distinct columns, so this holds; a tagging that breaks a rule simply has no defaults.
  return change.ok ? change.settings : null
}

/**
 * Applies a client's partial settings to a base (the tagging's defaults, or the previous
 * version's settings) with the one shared rule (applySettingsChange). Answers 400 with every
 * problem under "settings.<field>", the first one as the message; a missing response or levels
 * says the dataset version is not tagged yet.
 */
export function mergeSettings(base: AnalysisSettings | null, patch: AnalysisSettingsPatch): AnalysisSettings {
  const change = applySettingsChange(base, patch)
  if (change.ok) return change.settings
  const issues = change.problems.map((problem) => ({
    path: ['settings', problem.path].filter(Boolean).join('.'),
    message: problem.message,
  }))
  const untagged = change.problems.some((p) => p.path === 'response' || p.path === 'levels')
  throw new InvalidPayloadError(
    untagged
      ? 'This dataset version is not tagged yet: choose the response and the nesting levels.'
      : (issues[0]?.message ?? 'The settings are not valid.'),
    { issues },
  )
}

/** Every label of a column when the profile knows them all (not capped, all in the top list), else null. */
export function knownLabels(column: ColumnProfile | undefined): string[] | null {
  if (!column || column.distinctCapped || !column.topValues || column.topValues.length < column.distinctCount)
    return null
  return column.topValues.map((t) => t.value)
}

/** The known labels of every text column (for the reference picker of each condition factor). */
export function labelsByColumn(columns: readonly ColumnProfile[]): Record<string, string[]> {
  const out: Record<string, string[]> = {}
  for (const column of columns) {
    if (column.type !== 'text') continue
    const labels = knownLabels(column)
    if (labels) out[column.name] = labels
  }
  return out
}

/**
 * What each column could be as a response, from its profile (the form suggests a family from it):
 * binary when it holds two labels as text (areYesNoLabels), or only 0 and 1 as numbers; count when it holds
 * whole numbers of at least 0 and is not binary.
 */
export function responseKinds(
  columns: readonly ColumnProfile[],
): Pick<AnalysisDefaults, 'binaryColumns' | 'countColumns'> {
  const binaryColumns: Record<string, string[]> = {}
  const countColumns: string[] = []
  for (const column of columns) {
    const labels = knownLabels(column)
    const numeric = column.type === 'integer' || column.type === 'numeric'
    const zeroOne =
      numeric && column.min !== null && column.max !== null && column.min >= 0 && column.max <= 1
    const yesNo = labels !== null && (column.type === 'text' ? areYesNoLabels(labels) : labels.length === 2)
    if (yesNo && (column.type === 'text' || (zeroOne && column.type === 'integer'))) {
      binaryColumns[column.name] = labels
      continue
    }
    if (column.type === 'integer' && column.min !== null && column.min >= 0 && !zeroOne)
      countColumns.push(column.name)
  }
  return { binaryColumns, countColumns }
}

/**
 * Checks settings against the column profiles of the dataset version: each named column exists,
 * the response and the covariates are not empty, and each reference level is one of its factor's
 * labels when the profile knows them all. 400 naming the column and its place in the settings.
 * What the profile cannot tell (a covariate's text cell in a kept row, a constant or confounded
 * second factor) is checked on the rows by analysis-design-checks.service.
 */
export function checkSettingsAgainstColumns(
  settings: AnalysisSettings,
  columns: ColumnProfile[],
  datasetVersionNo: number,
): void {
  const byName = new Map(columns.map((c) => [c.name, c]))
  const issues: { path: string; message: string }[] = []
  const need = (path: string, name: string) => {
    if (!byName.has(name))
      issues.push({ path, message: `Version ${datasetVersionNo} of this dataset has no column ${q(name)}.` })
  }
  const notEmpty = (path: string, name: string, role: string) => {
    if (byName.get(name)?.type === 'empty')
      issues.push({ path, message: `${q(name)} cannot be ${role}: it has no values.` })
  }
  need('settings.response', settings.response)
  settings.conditions.forEach((name, i) => need(`settings.conditions.${i}`, name))
  settings.covariates.forEach((name, i) => need(`settings.covariates.${i}`, name))
  settings.levels.forEach((name, i) => need(`settings.levels.${i}`, name))
  if (settings.trials !== null) need('settings.trials', settings.trials)
  notEmpty('settings.response', settings.response, 'the response')
  if (settings.trials !== null) notEmpty('settings.trials', settings.trials, 'the trials column')
  settings.covariates.forEach((name, i) => notEmpty(`settings.covariates.${i}`, name, 'a covariate'))
  for (const [factor, level] of Object.entries(settings.reference)) {
    const labels = knownLabels(byName.get(factor))
    if (labels && !labels.includes(level)) {
      issues.push({
        path: `settings.reference.${factor}`,
        message: `${q(level)} is not a value of ${q(factor)} (it has ${labels.map(q).join(', ')}).`,
      })
    }
  }
  if (issues.length) throw new InvalidPayloadError(issues[0].message, { issues })
}
