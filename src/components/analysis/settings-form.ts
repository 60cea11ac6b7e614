import type {
  AnalysisDefaults,
  AnalysisSettings,
  AnalysisSettingsPatch,
  ResponseFamily,
} from '../../../shared/schemas/analyses'
import { applySettingsChange } from '../../../shared/analysis/apply-settings-change'
import { defaultPositiveLabel } from '../../../shared/analysis/binary-response'

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
  /** The response's distribution; 'gaussian' unless the person confirmed another. */
  family: ResponseFamily
  /** Binomial: the response holds successes out of the trials in this column; null: one yes/no per row. */
  trials: string | null
  /** Binomial, one yes/no per row: the value counted as yes. */
  positive: string | null
}

/**
 * What the form needs from the defaults. `labelsByColumn` holds every label of the text columns
 * whose labels are all known; a column missing from it (or an older server without it) gets a
 * free-text reference field instead of a list.
 */
export type FormDefaults = Pick<AnalysisDefaults, 'columns' | 'numericColumns'> &
  Partial<Pick<AnalysisDefaults, 'labelsByColumn' | 'binaryColumns' | 'countColumns'>>

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
    family: settings?.family ?? 'gaussian',
    trials: settings?.trials ?? null,
    positive: settings?.positive ?? null,
  }
}

/** What the form suggests for a response column: yes/no for two values (or 0/1), counts for whole numbers ≥ 0. */
export type FamilySuggestion =
  { family: 'binomial'; values: string[]; positive: string } | { family: 'poisson' } | null

export function familySuggestion(defaults: FormDefaults, response: string | null): FamilySuggestion {
  if (response === null) return null
  const values = defaults.binaryColumns?.[response]
  if (values) return { family: 'binomial', values, positive: defaultPositiveLabel(values) }
  if (defaults.countColumns?.includes(response)) return { family: 'poisson' }
  return null
}

/** Columns that can be the response: those holding numbers, and those holding two values (yes/no). */
export function responseChoices(defaults: FormDefaults): string[] {
  const binary = new Set(Object.keys(defaults.binaryColumns ?? {}))
  return defaults.columns.filter((c) => defaults.numericColumns.includes(c) || binary.has(c))
}

/**
 * The draft after the person picks another response column: its own yes value and trials start
 * empty, and a kind the new column cannot be falls back to a measurement (the form then suggests
 * one again).
 */
export function withResponse(
  draft: SettingsDraft,
  defaults: FormDefaults,
  response: string | null,
): SettingsDraft {
  if (response === draft.response) return draft
  const next: SettingsDraft = { ...draft, response, positive: null, trials: null }
  const suggestion = familySuggestion(defaults, response)
  const fits =
    next.family === 'gaussian' ||
    (next.family === 'binomial' && suggestion?.family === 'binomial') ||
    (next.family === 'poisson' && suggestion !== null)
  return withFamily(next, defaults, fits ? next.family : 'gaussian')
}

/**
 * The draft after a family is chosen for the current response: a yes/no family picks the
 * suggested value as yes (the person may change it), any other family drops the trials and the yes
 * value, and the bootstrap goes off with trials (it resamples single observations).
 */
export function withFamily(
  draft: SettingsDraft,
  defaults: FormDefaults,
  family: ResponseFamily,
): SettingsDraft {
  const suggestion = familySuggestion(defaults, draft.response)
  if (family !== 'binomial') return { ...draft, family, trials: null, positive: null }
  const positive =
    draft.trials === null && suggestion?.family === 'binomial'
      ? (draft.positive ?? suggestion.positive)
      : null
  return { ...draft, family, positive }
}

/** The labels a reference of this column can be chosen from; empty when they are not known. */
export function labelsOf(defaults: FormDefaults, column: string): string[] {
  return defaults.labelsByColumn?.[column] ?? []
}

/** Columns free for each role: a column has one role, covariates, the response and the trials hold numbers. */
export function columnChoices(defaults: FormDefaults, draft: SettingsDraft) {
  const taken = (...roles: (string | null | string[])[]) => new Set(roles.flat().filter((c) => c !== null))
  const notIn = (set: Set<string>) => (c: string) => !set.has(c)
  const trials = draft.family === 'binomial' ? draft.trials : null
  return {
    conditions: defaults.columns.filter(notIn(taken(draft.response, trials, draft.levels, draft.covariates))),
    covariates: defaults.numericColumns.filter(
      notIn(taken(draft.response, trials, draft.levels, draft.conditions)),
    ),
    levels: defaults.columns.filter(notIn(taken(draft.response, trials, draft.conditions, draft.covariates))),
    trials: defaults.numericColumns.filter(
      notIn(taken(draft.response, draft.levels, draft.conditions, draft.covariates)),
    ),
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
  const binomial = draft.family === 'binomial'
  const trials = binomial ? draft.trials : null
  return {
    response: draft.response ?? undefined,
    conditions: draft.conditions,
    covariates: draft.covariates,
    levels: draft.levels,
    reference,
    bootstrap: {
      // Not offered for successes out of trials: the form shows the switch off and says why.
      enabled: draft.bootstrapEnabled && trials === null,
      resamples: givenResamples(draft) ?? 2000,
      seed: draft.seed,
    },
    family: draft.family,
    trials,
    positive: binomial && trials === null ? draft.positive : null,
  }
}

export type SettingsCheck =
  { ok: true; settings: AnalysisSettings } | { ok: false; problems: Record<string, string> }

/** Problems of list fields belong to the field ("levels.1" → "levels"); the whole form is "form". */
function fieldOf(path: string): string {
  if (path === '') return 'form'
  if (path.startsWith('reference.') || path.startsWith('bootstrap.')) return path
  if (path === 'trials' || path === 'positive' || path === 'family') return path
  return path.split('.')[0]
}

/** What only the client can tell from the defaults: text columns in number roles, unknown labels. */
function columnProblems(draft: SettingsDraft, defaults: FormDefaults | null): Record<string, string> {
  const problems: Record<string, string> = {}
  if (!defaults) return problems
  const numeric = new Set(defaults.numericColumns)
  const binary = draft.response ? defaults.binaryColumns?.[draft.response] : undefined
  const yesNo = draft.family === 'binomial' && draft.trials === null
  if (draft.response && !numeric.has(draft.response) && !(binary && yesNo))
    problems.response = binary
      ? `“${draft.response}” holds two values, not numbers: analyse it as yes/no`
      : `“${draft.response}” holds no numbers`
  if (draft.response && yesNo && !binary)
    problems.response = `“${draft.response}” does not hold exactly two values; give successes out of trials instead`
  if (yesNo && binary && draft.positive && !binary.includes(draft.positive))
    problems.positive = `“${draft.positive}” is not a value of “${draft.response}”`
  if (draft.family === 'binomial' && draft.trials === '') problems.trials = 'Choose the trials column'
  if (
    draft.family === 'poisson' &&
    draft.response &&
    numeric.has(draft.response) &&
    defaults.countColumns &&
    !defaults.countColumns.includes(draft.response) &&
    !binary
  )
    problems.response = `“${draft.response}” holds numbers that are not all whole and at least 0: it is not a count`
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
