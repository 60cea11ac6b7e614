import type {
  AnalysisDefaults,
  AnalysisSettings,
  AnalysisSettingsPatch,
} from '../../../shared/schemas/analyses'
import { applySettingsChange } from '../../../shared/analysis/apply-settings-change'

/** Editable settings as the form holds them (resamples as a number field may be empty). */
export interface SettingsDraft {
  response: string | null
  /** Condition factors: none, one, or two (fitted with their interaction). */
  conditions: string[]
  covariates: string[]
  levels: string[]
  /** Reference level per chosen condition; empty: the first label in the file. */
  reference: Record<string, string | null>
  bootstrapEnabled: boolean
  resamples: number | null
  seed: string
}

/**
 * What the form needs from the defaults. `labelsByColumn` holds every label of the text columns
 * whose labels are all known; a column missing from it (or an older server without it) gets a
 * free-text reference field instead of a list.
 */
export type FormDefaults = Pick<AnalysisDefaults, 'columns' | 'numericColumns'> & {
  labelsByColumn?: Record<string, string[]>
}

export function draftFrom(settings: AnalysisSettings | null): SettingsDraft {
  return {
    response: settings?.response ?? null,
    conditions: [...(settings?.conditions ?? [])],
    covariates: [...(settings?.covariates ?? [])],
    levels: [...(settings?.levels ?? [])],
    reference: { ...settings?.reference },
    bootstrapEnabled: settings?.bootstrap.enabled ?? false,
    resamples: settings?.bootstrap.resamples ?? 2000,
    seed: settings?.bootstrap.seed ?? '1',
  }
}

/** The labels a reference of this column can be chosen from; empty when they are not known. */
export function labelsOf(defaults: FormDefaults, column: string): string[] {
  return defaults.labelsByColumn?.[column] ?? []
}

/** Columns free for each role: a column has one role, covariates and the response hold numbers. */
export function columnChoices(defaults: FormDefaults, draft: SettingsDraft) {
  const taken = (...roles: (string | null | string[])[]) => new Set(roles.flat().filter((c) => c !== null))
  const notIn = (set: Set<string>) => (c: string) => !set.has(c)
  return {
    conditions: defaults.columns.filter(notIn(taken(draft.response, draft.levels, draft.covariates))),
    covariates: defaults.numericColumns.filter(notIn(taken(draft.response, draft.levels, draft.conditions))),
    levels: defaults.columns.filter(notIn(taken(draft.response, draft.conditions, draft.covariates))),
  }
}

/** A number field left empty holds "" (v-model.number), not a number. */
function givenResamples(draft: SettingsDraft): number | null {
  return typeof draft.resamples === 'number' && Number.isFinite(draft.resamples) ? draft.resamples : null
}

/** The change the draft asks for: every field, so the result does not depend on the base. */
export function draftToChange(draft: SettingsDraft): AnalysisSettingsPatch {
  const reference: Record<string, string> = {}
  for (const factor of draft.conditions) {
    const level = draft.reference[factor]?.trim()
    if (level) reference[factor] = level
  }
  return {
    response: draft.response ?? undefined,
    conditions: draft.conditions,
    covariates: draft.covariates,
    levels: draft.levels,
    reference,
    bootstrap: {
      enabled: draft.bootstrapEnabled,
      resamples: givenResamples(draft) ?? 2000,
      seed: draft.seed,
    },
  }
}

export type SettingsCheck =
  { ok: true; settings: AnalysisSettings } | { ok: false; problems: Record<string, string> }

/** Problems of list fields belong to the field ("levels.1" → "levels"); the whole form is "form". */
function fieldOf(path: string): string {
  if (path === '') return 'form'
  if (path.startsWith('reference.') || path.startsWith('bootstrap.')) return path
  return path.split('.')[0]
}

/** What only the client can tell from the defaults: text columns in number roles, unknown labels. */
function columnProblems(draft: SettingsDraft, defaults: FormDefaults | null): Record<string, string> {
  const problems: Record<string, string> = {}
  if (!defaults) return problems
  const numeric = new Set(defaults.numericColumns)
  if (draft.response && !numeric.has(draft.response))
    problems.response = `“${draft.response}” holds no numbers`
  const textCovariate = draft.covariates.find((c) => !numeric.has(c))
  if (textCovariate) problems.covariates = `“${textCovariate}” holds no numbers`
  for (const factor of draft.conditions) {
    const labels = labelsOf(defaults, factor)
    const level = draft.reference[factor]?.trim()
    if (level && labels.length && !labels.includes(level))
      problems[`reference.${factor}`] = `“${level}” is not a value of “${factor}”`
  }
  if (draft.bootstrapEnabled && givenResamples(draft) === null)
    problems['bootstrap.resamples'] = 'Give the number of resamples'
  return problems
}

/**
 * Checks the draft with applySettingsChange, the one function the server applies a change with,
 * so the form shows the problems the server would answer 400 with, keyed by field ("response",
 * "conditions", "reference.genotype", "bootstrap.resamples", "form" for whole-form issues).
 */
export function checkDraft(draft: SettingsDraft, defaults: FormDefaults | null): SettingsCheck {
  const change = applySettingsChange(null, draftToChange(draft))
  const problems = columnProblems(draft, defaults)
  if (!change.ok) for (const p of change.problems) problems[fieldOf(p.path)] ??= p.message
  if (change.ok && Object.keys(problems).length === 0) return { ok: true, settings: change.settings }
  return { ok: false, problems }
}
