import { AnalysisSettings, type AnalysisSettingsPatch } from '../../shared/schemas/analyses'
import type { ColumnProfile, Tagging } from '../../shared/schemas/datasets'
import { InvalidPayloadError } from '../errors/app-error'
import { zodIssues } from '../errors/translate-error'

const q = (name: string) => `“${name}”`

/** Settings from a version's tagging: its first response, its condition and levels, the display defaults. */
export function settingsFromTagging(
  tagging: Pick<Tagging, 'responseColumns' | 'conditionColumn' | 'levels'> | null,
): AnalysisSettings | null {
  if (!tagging || !tagging.responseColumns.length || !tagging.levels.length) return null
  return AnalysisSettings.parse({
    response: tagging.responseColumns[0],
    condition: tagging.conditionColumn,
    levels: tagging.levels,
  })
}

/**
 * Applies a client's partial settings to a base (the tagging's defaults, or the previous
 * version's settings). The reference condition is kept only while the condition column stays
 * the same; bootstrap fields merge one by one. Answers 400 when response or levels are still
 * unknown, or the result breaks a rule of the schema.
 */
export function mergeSettings(base: AnalysisSettings | null, patch: AnalysisSettingsPatch): AnalysisSettings {
  const condition = patch.condition !== undefined ? patch.condition : (base?.condition ?? null)
  const sameCondition = base !== null && condition === base.condition
  const merged = {
    response: patch.response ?? base?.response,
    condition,
    levels: patch.levels ?? base?.levels,
    reference: patch.reference !== undefined ? patch.reference : sameCondition ? base.reference : null,
    errorBar: patch.errorBar ?? base?.errorBar,
    bootstrap: { ...base?.bootstrap, ...patch.bootstrap },
  }
  if (merged.response === undefined || merged.levels === undefined) {
    throw new InvalidPayloadError(
      'This dataset version is not tagged yet: choose the response and the nesting levels.',
      {
        issues: [
          ...(merged.response === undefined
            ? [{ path: 'settings.response', message: 'Choose the response column' }]
            : []),
          ...(merged.levels === undefined
            ? [{ path: 'settings.levels', message: 'Choose the nesting levels' }]
            : []),
        ],
      },
    )
  }
  const parsed = AnalysisSettings.safeParse(merged)
  if (!parsed.success) {
    const issues = zodIssues(parsed.error).map((issue) => ({
      ...issue,
      path: ['settings', issue.path].filter(Boolean).join('.'),
    }))
    throw new InvalidPayloadError(issues[0]?.message ?? 'The settings are not valid.', { issues })
  }
  return parsed.data
}

/** Every label of a column when the profile knows them all (not capped, all in the top list), else null. */
export function knownLabels(column: ColumnProfile | undefined): string[] | null {
  if (!column || column.distinctCapped || !column.topValues || column.topValues.length < column.distinctCount)
    return null
  return column.topValues.map((t) => t.value)
}

/**
 * Checks settings against the columns of the dataset version: each named column exists, the
 * response is not empty, and a reference condition is one of the condition's labels when the
 * profile knows them all. 400 naming the column; the engine checks the rest when it runs.
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
  need('settings.response', settings.response)
  if (settings.condition) need('settings.condition', settings.condition)
  settings.levels.forEach((name, i) => need(`settings.levels.${i}`, name))
  const response = byName.get(settings.response)
  if (response?.type === 'empty')
    issues.push({
      path: 'settings.response',
      message: `${q(settings.response)} cannot be the response: it has no values.`,
    })
  if (settings.condition && settings.reference !== null) {
    const labels = knownLabels(byName.get(settings.condition))
    if (labels && !labels.includes(settings.reference)) {
      issues.push({
        path: 'settings.reference',
        message: `${q(settings.reference)} is not a value of ${q(settings.condition)} (it has ${labels.map(q).join(', ')}).`,
      })
    }
  }
  if (issues.length) throw new InvalidPayloadError(issues[0].message, { issues })
}
