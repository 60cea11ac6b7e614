import { AnalysisSettings, type AnalysisDefaults } from '../../../shared/schemas/analyses'

/** Editable settings as the form holds them (resamples as a number field may be empty). */
export interface SettingsDraft {
  response: string | null
  condition: string | null
  levels: string[]
  reference: string | null
  errorBar: AnalysisSettings['errorBar']
  bootstrapEnabled: boolean
  resamples: number | null
  seed: string
}

export function draftFrom(settings: AnalysisSettings | null): SettingsDraft {
  return {
    response: settings?.response ?? null,
    condition: settings?.condition ?? null,
    levels: [...(settings?.levels ?? [])],
    reference: settings?.reference ?? null,
    errorBar: settings?.errorBar ?? 'sem',
    bootstrapEnabled: settings?.bootstrap.enabled ?? false,
    resamples: settings?.bootstrap.resamples ?? 2000,
    seed: settings?.bootstrap.seed ?? '1',
  }
}

export type SettingsCheck =
  { ok: true; settings: AnalysisSettings } | { ok: false; problems: Record<string, string> }

/**
 * Checks the draft with the same zod schema the server uses, and returns problems keyed by field
 * ("response", "levels", "bootstrap.resamples", "form" for whole-form issues).
 */
export function checkDraft(draft: SettingsDraft, defaults: AnalysisDefaults | null): SettingsCheck {
  const parsed = AnalysisSettings.safeParse({
    response: draft.response ?? '',
    condition: draft.condition || null,
    levels: draft.levels,
    reference: draft.condition ? draft.reference || null : null,
    errorBar: draft.errorBar,
    bootstrap: {
      enabled: draft.bootstrapEnabled,
      resamples: draft.resamples ?? Number.NaN,
      seed: draft.seed,
    },
  })
  const problems: Record<string, string> = {}
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const key = issue.path.length ? issue.path.join('.') : 'form'
      problems[key] ??= key === 'response' && !draft.response ? 'Pick the measured column' : issue.message
    }
  }
  if (draft.response && defaults && !defaults.numericColumns.includes(draft.response)) {
    problems.response ??= `“${draft.response}” holds no numbers`
  }
  if (parsed.success && Object.keys(problems).length === 0) return { ok: true, settings: parsed.data }
  return { ok: false, problems }
}
