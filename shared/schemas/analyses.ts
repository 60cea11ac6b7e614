import { z } from 'zod'
import { AnalysisResult, Interval, LevelIcc, VarianceComponentShare } from './analysis-result'

/**
 * Analyses API shapes. An analysis belongs to one dataset; each run of it is an immutable version
 * holding the settings it ran with, the dataset version (and its file checksum) it read, the
 * engine version, and once done the engine's result plus the chart data computed on the server.
 * Changing settings never edits a version: it creates the next one.
 */

const Id = z.coerce.number().int().positive()
const ColumnName = z.string().min(1).max(200)
const count = z.number().int().nonnegative()
const Person = z.object({ id: z.number().int(), name: z.string() })

// ---------------------------------------------------------------- settings

/** Which error bar a page shows first: a display preference of the viewer, not part of the computation. */
export const ErrorBarType = z.enum(['sem', 'sd', 'ci95'])
export type ErrorBarType = z.infer<typeof ErrorBarType>

export const BOOTSTRAP_MIN_RESAMPLES = 100
export const BOOTSTRAP_MAX_RESAMPLES = 10_000
/** At most this many condition factors (A, or A × B). */
export const MAX_CONDITIONS = 2
/** At most this many numeric covariates. */
export const MAX_COVARIATES = 4

export const BootstrapSettings = z.object({
  enabled: z.boolean().default(false),
  resamples: z
    .number()
    .int()
    .min(BOOTSTRAP_MIN_RESAMPLES, { error: `Use at least ${BOOTSTRAP_MIN_RESAMPLES} resamples` })
    .max(BOOTSTRAP_MAX_RESAMPLES, { error: `Use at most ${BOOTSTRAP_MAX_RESAMPLES} resamples` })
    .default(2000),
  /** Any text; the same seed on the same data gives the same interval. */
  seed: z.string().trim().min(1, { error: 'Give the bootstrap a seed' }).max(64).default('1'),
})
export type BootstrapSettings = z.infer<typeof BootstrapSettings>

const Label = z.string().max(10_000)

/**
 * The distribution of the response: a measurement ('gaussian', the linear mixed model), a yes/no
 * response or successes out of trials ('binomial', logit link) or a count ('poisson', log link),
 * the last two fitted as GLMMs by the Laplace approximation.
 */
export const ResponseFamily = z.enum(['gaussian', 'binomial', 'poisson'])
export type ResponseFamily = z.infer<typeof ResponseFamily>

/**
 * Settings stored by the first engine (0.1): one condition, one reference label, and the error
 * bar shown first. Still read, never written: a stored version keeps its original JSON, so
 * sign-offs made over it stay valid.
 */
function upgradeFirstSettings(raw: unknown): unknown {
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw) || !('condition' in raw)) return raw
  const { condition, reference, errorBar: _shownFirst, ...rest } = raw as Record<string, unknown>
  const named = typeof condition === 'string' ? condition : null
  return {
    ...rest,
    conditions: named ? [named] : [],
    covariates: [],
    reference: named && typeof reference === 'string' ? { [named]: reference } : {},
  }
}

const SettingsFields = z
  .object({
    response: ColumnName,
    /** Condition factors (fixed effects): none, one, or two (fitted as A * B). */
    conditions: z
      .array(ColumnName)
      .max(MAX_CONDITIONS, { error: `Pick at most ${MAX_CONDITIONS} condition columns` })
      .default([]),
    /** Numeric covariates, measured per observation or per unit; comparisons are adjusted for them. */
    covariates: z
      .array(ColumnName)
      .max(MAX_COVARIATES, { error: `Pick at most ${MAX_COVARIATES} covariates` })
      .default([]),
    /** Nesting levels, outermost first (lab, animal, …); observations are the rows. */
    levels: z.array(ColumnName).min(1, { error: 'Pick at least one nesting level' }).max(8),
    /** Reference level per condition column; a condition left out uses its first label in file order. */
    reference: z.record(ColumnName, Label).default({}),
    bootstrap: BootstrapSettings.default({ enabled: false, resamples: 2000, seed: '1' }),
    /**
     * The response's distribution (engine ≥ 0.3). Settings stored without it read as 'gaussian';
     * a stored version's JSON is never rewritten.
     */
    family: ResponseFamily.default('gaussian'),
    /** Binomial only: the column of trials per row; the response column then holds the successes. */
    trials: ColumnName.nullable().default(null),
    /**
     * Binomial without trials: the response value counted as yes (1); the other value is no (0).
     * Null until a version is created: the server then decides it from the values (1 for a 0/1
     * column, otherwise see defaultPositiveLabel) and stores it with the version.
     */
    positive: Label.nullable().default(null),
  })
  .superRefine((s, ctx) => {
    const all = [s.response, ...s.conditions, ...s.covariates, ...s.levels, ...(s.trials ? [s.trials] : [])]
    const seen = new Set<string>()
    for (const name of all) {
      if (seen.has(name))
        ctx.addIssue({
          code: 'custom',
          message: `"${name}" is used twice; each column can have one role`,
          path: [],
        })
      seen.add(name)
    }
    for (const factor of Object.keys(s.reference)) {
      if (!s.conditions.includes(factor)) {
        ctx.addIssue({
          code: 'custom',
          message: `A reference level for "${factor}" needs "${factor}" as a condition column`,
          path: ['reference', factor],
        })
      }
    }
    if (s.trials !== null && s.family !== 'binomial')
      ctx.addIssue({
        code: 'custom',
        message: 'A trials column needs the binomial family (successes out of trials)',
        path: ['trials'],
      })
    if (s.positive !== null && (s.family !== 'binomial' || s.trials !== null))
      ctx.addIssue({
        code: 'custom',
        message: 'Only a yes/no response has a value counted as yes',
        path: ['positive'],
      })
    if (s.trials !== null && s.bootstrap.enabled)
      ctx.addIssue({
        code: 'custom',
        message:
          'The hierarchical bootstrap resamples single observations, so it is not offered for successes out of trials; switch it off',
        path: ['bootstrap', 'enabled'],
      })
  })

/**
 * What one analysis version computes. Column names are the dataset's header names. The server
 * checks that every column exists in the dataset version (400 naming the column). Settings
 * stored by engine 0.1 ({ condition, reference: label, errorBar }) are read in this form.
 */
export const AnalysisSettings = z.preprocess(upgradeFirstSettings, SettingsFields)
export type AnalysisSettings = z.infer<typeof SettingsFields>

/** Settings as sent by a client: any field left out is taken from the defaults (or the previous version). */
export const AnalysisSettingsPatch = z.object({
  response: ColumnName.optional(),
  conditions: z.array(ColumnName).max(MAX_CONDITIONS).optional(),
  covariates: z.array(ColumnName).max(MAX_COVARIATES).optional(),
  levels: z.array(ColumnName).min(1, { error: 'Pick at least one nesting level' }).max(8).optional(),
  /** Replaces the reference levels; factors no longer among the conditions are dropped. */
  reference: z.record(ColumnName, Label).optional(),
  bootstrap: z
    .object({
      enabled: z.boolean().optional(),
      resamples: z.number().int().min(BOOTSTRAP_MIN_RESAMPLES).max(BOOTSTRAP_MAX_RESAMPLES).optional(),
      seed: z.string().trim().min(1).max(64).optional(),
    })
    .optional(),
  family: ResponseFamily.optional(),
  /** Null: no trials column (one yes/no per row). Dropped when the family is no longer binomial. */
  trials: ColumnName.nullable().optional(),
  /** Null: let the server decide (and store) which value counts as yes. Dropped with a new response. */
  positive: Label.nullable().optional(),
})
export type AnalysisSettingsPatch = z.infer<typeof AnalysisSettingsPatch>

// ---------------------------------------------------------------- chart data

/** The naive bars of one condition: the interval of the plain mean (SD/√n, t with n − 1 df) and the SD. */
export const NaiveBars = Interval.extend({
  /** SD of all the condition's observations. */
  sd: z.number().nonnegative(),
})
export type NaiveBars = z.infer<typeof NaiveBars>

/** The nested bars of one condition: the model's interval (Satterthwaite df) and the SD of unit means. */
export const NestedBars = Interval.extend({
  /** SD of the unit means at the condition level; null without a condition level or with one unit. */
  sd: z.number().nonnegative().nullable(),
  /** Units behind `sd` (units carrying this condition at the condition level); null without a condition level. */
  nUnits: count.nullable(),
})
export type NestedBars = z.infer<typeof NestedBars>

/**
 * Bars stored before the one interval shape ({ mean, sem, ci95, df, … }) read as Interval + sd.
 * Stored charts are never rewritten; they are read through this.
 */
function upgradeStoredBars(raw: unknown): unknown {
  if (typeof raw !== 'object' || raw === null || !('ci95' in raw)) return raw
  const { mean, sem, ci95, ...rest } = raw as Record<string, unknown>
  return { ...rest, estimate: mean, se: sem, ci: ci95 }
}

export const ConditionBars = z.object({
  /** Condition label (a design cell "a:b" for two factors), or "all" without a condition. */
  condition: z.string(),
  nObs: count,
  naive: z.preprocess(upgradeStoredBars, NaiveBars),
  nested: z.preprocess(upgradeStoredBars, NestedBars),
})
export type ConditionBars = z.infer<typeof ConditionBars>

export const UnitSummary = z.object({
  /** Labels from the outermost level down to this unit. */
  path: z.array(z.string()),
  /** The path joined with " / " (what the chart and the CSV show). */
  label: z.string(),
  /** The condition of this unit's observations; a unit spanning conditions appears once per condition. Null without a condition. */
  condition: z.string().nullable(),
  n: count,
  /** Mean of the unit's observations: a proportion of yes or a rate per observation for binary and count responses. */
  mean: z.number(),
  /** Sample SD (n − 1) of the unit's observations; null for a single observation (and with trials). */
  sd: z.number().nonnegative().nullable(),
  /** Successes out of trials: the unit's trials (its `mean` is then its successes over these). */
  trials: z.number().nonnegative().optional(),
})
export type UnitSummary = z.infer<typeof UnitSummary>

export const UnitLevelSummary = z.object({
  level: z.string(),
  /** Why this level is listed: it carries the condition, it is the innermost level, or both. */
  roles: z.array(z.enum(['condition-level', 'innermost', 'outer'])),
  units: z.array(UnitSummary),
})
export type UnitLevelSummary = z.infer<typeof UnitLevelSummary>

/**
 * A faithful sample of observations for the scatter: stratified by unit cell (unit × condition)
 * of `level`, every cell represented, at most about `limit` points, seeded so it never changes.
 * Columnar to keep the document small: point i has value y[i] and belongs to unit cell[i], an
 * index into the units of the unit level named `level`.
 */
export const ChartPoints = z.object({
  level: z.string(),
  limit: count,
  nTotal: count,
  nShown: count,
  seed: z.string(),
  y: z.array(z.number()),
  cell: z.array(z.number().int().nonnegative()),
})
export type ChartPoints = z.infer<typeof ChartPoints>

export const ChartData = z.object({
  /**
   * Binary and count responses (engine ≥ 0.3): the points and unit means are proportions or rates,
   * the bars the model's Wald intervals on that scale. Absent for a normal response.
   */
  family: z.enum(['binomial', 'poisson']).optional(),
  response: z.string(),
  condition: z.string().nullable(),
  /** Level whose units carry a single condition (from the result); null when none does. */
  conditionLevel: z.string().nullable(),
  /** In the model's order: reference first. */
  conditions: z.array(ConditionBars),
  /** Every given level outer → inner, each unit split by condition. */
  unitLevels: z.array(UnitLevelSummary),
  points: ChartPoints,
  /** Share of variance at each level and ICC per level (copied from the result for the chart). */
  variance: z.object({ components: z.array(VarianceComponentShare), icc: z.array(LevelIcc) }),
})
export type ChartData = z.infer<typeof ChartData>

/**
 * A chart as stored, in today's shape: bars stored by engine 0.1 ({ mean, sem, ci95 }) read as
 * the one interval shape. Only the few condition bars are touched, not the points.
 */
export function readStoredChart(stored: unknown): ChartData {
  const chart = stored as ChartData
  return { ...chart, conditions: chart.conditions.map((c) => ConditionBars.parse(c)) }
}

// ---------------------------------------------------------------- versions

export const AnalysisStatus = z.enum(['queued', 'running', 'done', 'failed'])
export type AnalysisStatus = z.infer<typeof AnalysisStatus>

export const AnalysisStage = z.enum([
  'queued',
  'reading',
  'fitting',
  'comparisons',
  'bootstrap',
  'charts',
  'saving',
  'done',
  'failed',
])
export type AnalysisStage = z.infer<typeof AnalysisStage>

export const AnalysisProgress = z.object({
  stage: AnalysisStage,
  /** Overall fraction done, 0 → 1 (an estimate from the stage, not a promise of time). */
  fraction: z.number().min(0).max(1),
})
export type AnalysisProgress = z.infer<typeof AnalysisProgress>

export const AnalysisRunError = z.object({
  /** UNPROCESSABLE: the engine found the data too thin (message says why); INTERNAL: anything else. */
  code: z.enum(['UNPROCESSABLE', 'INTERNAL']),
  message: z.string(),
  details: z.unknown().optional(),
})
export type AnalysisRunError = z.infer<typeof AnalysisRunError>

/** Exclusions that were active on the dataset version when this analysis version was created. */
export const AppliedExclusion = z.object({
  id: z.number().int().positive(),
  kind: z.enum(['rule', 'unit']),
  reason: z.string(),
  matchedRows: count,
})
export type AppliedExclusion = z.infer<typeof AppliedExclusion>

export const AnalysisVersionStatus = z.object({
  id: z.number().int().positive(),
  analysisId: z.number().int().positive(),
  versionNo: z.number().int().positive(),
  status: AnalysisStatus,
  progress: AnalysisProgress,
  error: AnalysisRunError.nullable(),
  createdAt: z.string(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
  /** Server time of the run (read-back + engine + charts), once finished. */
  runMs: count.nullable(),
})
export type AnalysisVersionStatus = z.infer<typeof AnalysisVersionStatus>

export const AnalysisVersionSummary = AnalysisVersionStatus.extend({
  datasetVersion: z.object({
    id: z.number().int().positive(),
    versionNo: z.number().int().positive(),
    sha256: z.string(),
  }),
  settings: AnalysisSettings,
  exclusions: z.array(AppliedExclusion),
  /** Engine that computed (or will compute) the result. */
  engineVersion: z.string(),
  createdBy: Person,
})
export type AnalysisVersionSummary = z.infer<typeof AnalysisVersionSummary>

export const AnalysisVersionDetail = AnalysisVersionSummary.extend({
  /** Null until done. */
  result: AnalysisResult.nullable(),
  chart: ChartData.nullable(),
})
export type AnalysisVersionDetail = z.infer<typeof AnalysisVersionDetail>

// ---------------------------------------------------------------- analyses

/** Headline numbers of a finished version, for lists and the lab board. */
export const AnalysisHeadline = z.object({
  nObs: count,
  effectiveN: z.number(),
  designEffect: z.number(),
  /** Fewest units in any condition at the condition level (null without one). */
  minUnitsPerCondition: count.nullable(),
  warningCount: count,
})
export type AnalysisHeadline = z.infer<typeof AnalysisHeadline>

export const AnalysisListItem = z.object({
  id: z.number().int().positive(),
  labId: z.number().int().positive(),
  labName: z.string(),
  project: z.object({ id: z.number().int().positive(), name: z.string() }),
  dataset: z.object({ id: z.number().int().positive(), name: z.string() }),
  name: z.string(),
  createdBy: Person,
  createdAt: z.string(),
  updatedAt: z.string(),
  versionCount: count,
  latestVersion: z.object({
    versionNo: z.number().int().positive(),
    status: AnalysisStatus,
    progress: AnalysisProgress,
    finishedAt: z.string().nullable(),
    headline: AnalysisHeadline.nullable(),
  }),
})
export type AnalysisListItem = z.infer<typeof AnalysisListItem>

export const AnalysisDetail = AnalysisListItem.extend({
  /** Newest first. */
  versions: z.array(AnalysisVersionSummary),
  /** What the caller may do; the client hides commands that would answer 403. */
  permissions: z.object({ run: z.boolean(), rename: z.boolean() }),
})
export type AnalysisDetail = z.infer<typeof AnalysisDetail>

// ---------------------------------------------------------------- requests

export const AnalysisCreate = z.object({
  datasetId: Id,
  /** Default: the dataset's newest version. */
  datasetVersionNo: Id.optional(),
  /** Default: "<dataset name> – <response>". */
  name: z.string().trim().min(1, { error: 'Give the analysis a name' }).max(200).optional(),
  /** Left-out fields come from the dataset version's tagging. */
  settings: AnalysisSettingsPatch.default({}),
})
export type AnalysisCreate = z.infer<typeof AnalysisCreate>

export const AnalysisVersionCreate = z.object({
  /** Default: the dataset version of the newest analysis version. */
  datasetVersionNo: Id.optional(),
  /** Left-out fields are taken from the newest analysis version. */
  settings: AnalysisSettingsPatch.default({}),
})
export type AnalysisVersionCreate = z.infer<typeof AnalysisVersionCreate>

export const AnalysisUpdate = z.object({
  name: z.string().trim().min(1, { error: 'Give the analysis a name' }).max(200),
})
export type AnalysisUpdate = z.infer<typeof AnalysisUpdate>

export const AnalysisListQuery = z.object({
  labId: Id.optional(),
  projectId: Id.optional(),
  datasetId: Id.optional(),
})
export type AnalysisListQuery = z.infer<typeof AnalysisListQuery>

export const AnalysisDefaultsQuery = z.object({
  datasetId: Id,
  datasetVersionNo: Id.optional(),
})

/** Settings a new analysis of this dataset version starts from, and the columns it may use. */
export const AnalysisDefaults = z.object({
  datasetVersion: z.object({ id: z.number().int().positive(), versionNo: z.number().int().positive() }),
  /** Null when the version is not tagged yet (the client must ask for response and levels). */
  settings: AnalysisSettings.nullable(),
  /** All column names, and the numeric ones (response and covariate candidates). */
  columns: z.array(z.string()),
  numericColumns: z.array(z.string()),
  /**
   * Every label of each text column whose profile knows them all (most frequent first), for the
   * reference picker of each chosen condition factor. A column left out has too many labels to list.
   */
  labelsByColumn: z.record(z.string(), z.array(z.string())),
  /**
   * Columns a yes/no response can come from, with their two values (most frequent first): text
   * columns with exactly two values, and numeric columns holding only 0 and 1. The form suggests
   * the binomial family for these.
   */
  binaryColumns: z.record(z.string(), z.array(z.string())),
  /** Columns of whole numbers of at least 0 (not only 0/1): the form offers the Poisson family for these. */
  countColumns: z.array(z.string()),
})
export type AnalysisDefaults = z.infer<typeof AnalysisDefaults>

export const AnalysisParams = z.object({ analysisId: Id })
export const AnalysisVersionParams = z.object({ analysisId: Id, versionNo: Id })
