import { AnalysisSettings, type AnalysisSettingsPatch } from '../schemas/analyses'

export interface SettingsProblem {
  /** Dotted path of the field ("response", "levels", "reference.genotype", "bootstrap.resamples"; "" for the whole form). */
  path: string
  message: string
}

export type SettingsChange =
  { ok: true; settings: AnalysisSettings } | { ok: false; problems: SettingsProblem[] }

/**
 * The one way a settings change is applied, by the settings form and by the server alike: the
 * fields a change names replace those of the base (the tagging's defaults or the previous
 * version's settings), bootstrap fields one by one; a reference level survives only while its
 * factor is still a condition column; the base's trials column only while the family stays
 * binomial, and its value counted as yes only while the family stays binomial without trials and
 * the response stays the same. What a change names itself is kept, so a change that contradicts
 * itself ({ family: 'poisson', trials: 'n' }) is reported, not quietly mended. The outcome is
 * checked with the shared schema, so the form shows exactly the problems the server would answer
 * 400 with.
 *
 * @example
 * applySettingsChange(previous, { conditions: ['genotype', 'treatment'] })
 * // → { ok: true, settings: { …previous, conditions: ['genotype', 'treatment'], reference: { treatment: 'vehicle' } } }
 */
export function applySettingsChange(
  base: AnalysisSettings | null,
  change: AnalysisSettingsPatch,
): SettingsChange {
  const conditions = change.conditions ?? base?.conditions ?? []
  const reference = Object.fromEntries(
    Object.entries(change.reference ?? base?.reference ?? {}).filter(([factor]) =>
      conditions.includes(factor),
    ),
  )
  const response = change.response ?? base?.response
  const family = change.family ?? base?.family ?? 'gaussian'
  const trials =
    change.trials !== undefined ? change.trials : family === 'binomial' ? (base?.trials ?? null) : null
  const sameResponse = response === base?.response
  const positive =
    change.positive !== undefined
      ? change.positive
      : family === 'binomial' && trials === null && sameResponse
        ? (base?.positive ?? null)
        : null
  const merged = {
    response,
    conditions,
    covariates: change.covariates ?? base?.covariates ?? [],
    levels: change.levels ?? base?.levels,
    reference,
    bootstrap: { ...base?.bootstrap, ...change.bootstrap },
    family,
    trials,
    positive,
  }
  const missing: SettingsProblem[] = []
  if (merged.response === undefined) missing.push({ path: 'response', message: 'Choose the response column' })
  if (merged.levels === undefined) missing.push({ path: 'levels', message: 'Choose the nesting levels' })
  if (missing.length) return { ok: false, problems: missing }

  const parsed = AnalysisSettings.safeParse(merged)
  if (parsed.success) return { ok: true, settings: parsed.data }
  return {
    ok: false,
    problems: parsed.error.issues.map((issue) => ({ path: issue.path.join('.'), message: issue.message })),
  }
}
