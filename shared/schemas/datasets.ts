import { z } from 'zod'

/**
 * Datasets API shapes (requests are parsed with these schemas on the server; responses follow them).
 * Column names are the header names of the uploaded file; they are unique within a version.
 */

const Id = z.coerce.number().int().positive()
const ColumnName = z.string().min(1).max(200)

// ---------------------------------------------------------------- projects

export const Project = z.object({
  id: z.number().int().positive(),
  labId: z.number().int().positive(),
  name: z.string(),
  description: z.string(),
  datasetCount: z.number().int().nonnegative(),
  createdAt: z.string(),
  updatedAt: z.string(),
})
export type Project = z.infer<typeof Project>

export const ProjectCreate = z.object({
  labId: Id,
  name: z.string().trim().min(1, { error: 'Give the project a name' }).max(120),
  description: z.string().trim().max(2000).default(''),
})
export type ProjectCreate = z.infer<typeof ProjectCreate>

export const ProjectUpdate = z
  .object({
    name: z.string().trim().min(1, { error: 'Give the project a name' }).max(120).optional(),
    description: z.string().trim().max(2000).optional(),
  })
  .refine((v) => v.name !== undefined || v.description !== undefined, { error: 'Nothing to change' })
export type ProjectUpdate = z.infer<typeof ProjectUpdate>

export const ProjectListQuery = z.object({ labId: Id.optional() })

// ---------------------------------------------------------------- columns

export const ColumnType = z.enum(['integer', 'numeric', 'text', 'empty'])
export type ColumnType = z.infer<typeof ColumnType>

export const ColumnProfile = z.object({
  /** 1-based position in the file. */
  position: z.number().int().positive(),
  name: z.string(),
  type: ColumnType,
  missingCount: z.number().int().nonnegative(),
  /** Distinct non-missing values; when `distinctCapped`, "at least" this many. */
  distinctCount: z.number().int().nonnegative(),
  distinctCapped: z.boolean(),
  min: z.number().nullable(),
  max: z.number().nullable(),
  mean: z.number().nullable(),
  sd: z.number().nullable(),
  /** First few distinct values in file order. */
  sampleValues: z.array(z.string()),
  /** Most frequent values with their row counts (null when there are too many distinct values). */
  topValues: z.array(z.object({ value: z.string(), count: z.number().int() })).nullable(),
})
export type ColumnProfile = z.infer<typeof ColumnProfile>

// ---------------------------------------------------------------- nesting suggestion

export const NestingLevelSuggestion = z.object({
  column: z.string(),
  /** Distinct units at this level, each keyed by its full path (lab · animal). */
  unitCount: z.number().int().nonnegative(),
  /** Children per unit of the level above (for the outermost level: null). */
  perParent: z.object({ min: z.number(), median: z.number(), max: z.number() }).nullable(),
  /** Labels used under more than one parent (e.g. "m01" in two labs), up to five examples. */
  reusedLabels: z.array(z.string()),
  /** How many labels are reused in all (reusedLabels lists the first few); absent in older records. */
  reusedLabelCount: z.number().int().nonnegative().optional(),
})
export type NestingLevelSuggestion = z.infer<typeof NestingLevelSuggestion>

export const ConditionPlacement = z.enum(['between-top', 'between-units', 'within-innermost'])
export type ConditionPlacement = z.infer<typeof ConditionPlacement>

export const NestingSuggestion = z.object({
  levels: z.array(NestingLevelSuggestion),
  conditionColumn: z.string().nullable(),
  /** The level whose units receive the condition (null when there is no condition or it varies within every unit). */
  conditionLevel: z.string().nullable(),
  conditionPlacement: ConditionPlacement.nullable(),
  responseColumns: z.array(z.string()),
  /** Columns that add nothing to the nesting (constant within a chosen level), with the level. */
  aliases: z.array(z.object({ column: z.string(), sameAs: z.string() })),
  /** Plain sentences for the person tagging the data. */
  explanation: z.array(z.string()),
  observationCount: z.number().int().nonnegative(),
})
export type NestingSuggestion = z.infer<typeof NestingSuggestion>

// ---------------------------------------------------------------- tagging

export const TaggingInput = z
  .object({
    responseColumns: z.array(ColumnName).min(1, { error: 'Pick at least one response column' }).max(20),
    conditionColumn: ColumnName.nullable().default(null),
    levels: z.array(ColumnName).min(1, { error: 'Pick at least one nesting level' }).max(8),
  })
  .superRefine((v, ctx) => {
    const all = [...v.responseColumns, ...(v.conditionColumn ? [v.conditionColumn] : []), ...v.levels]
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
  })
export type TaggingInput = z.infer<typeof TaggingInput>

export const DesignLevel = z.object({
  column: z.string(),
  unitCount: z.number().int().nonnegative(),
  perParent: z.object({ min: z.number(), median: z.number(), max: z.number() }).nullable(),
  reusedLabels: z.array(z.string()),
  /** How many labels are reused in all (reusedLabels lists the first few); absent in older records. */
  reusedLabelCount: z.number().int().nonnegative().optional(),
})

/** What the tagged nesting means for the data as it stands (exclusions applied). */
export const DesignSummary = z.object({
  observationCount: z.number().int().nonnegative(),
  levels: z.array(DesignLevel),
  conditionLevel: z.string().nullable(),
  conditionPlacement: ConditionPlacement.nullable(),
  /** Per condition value: units at the condition level (or observations when it varies within every unit). */
  arms: z.array(
    z.object({ value: z.string(), unitCount: z.number().int(), observationCount: z.number().int() }),
  ),
  explanation: z.array(z.string()),
  /**
   * Response columns with no value in some kept rows: an analysis of that response leaves those
   * rows out, so its count of observations is smaller than the rows here ("3 rows have no …").
   */
  missingValues: z.array(z.object({ column: z.string(), rows: z.number().int().positive() })).default([]),
})
export type DesignSummary = z.infer<typeof DesignSummary>

export const Tagging = z.object({
  id: z.number().int().positive(),
  versionId: z.number().int().positive(),
  responseColumns: z.array(z.string()),
  conditionColumn: z.string().nullable(),
  levels: z.array(z.string()),
  createdBy: z.object({ id: z.number().int(), name: z.string() }),
  createdAt: z.string(),
  /** True when copied from the previous version at upload because all its columns still exist. */
  carriedOver: z.boolean(),
})
export type Tagging = z.infer<typeof Tagging>

// ---------------------------------------------------------------- exclusions

export const RuleOperator = z.enum(['eq', 'ne', 'lt', 'le', 'gt', 'ge', 'missing'])
export type RuleOperator = z.infer<typeof RuleOperator>

export const ExclusionRule = z
  .object({
    column: ColumnName,
    operator: RuleOperator,
    /** Text for eq/ne on text columns; a number (or numeric text) for numeric comparisons; absent for `missing`. */
    value: z
      .union([z.string().max(10_000), z.number()])
      .nullable()
      .default(null),
  })
  .refine((r) => r.operator === 'missing' || r.value !== null, {
    error: 'This rule needs a value',
    path: ['value'],
  })
export type ExclusionRule = z.infer<typeof ExclusionRule>

export const ExclusionUnit = z.object({
  /** From the outermost level down to the unit: [{ column: 'lab', value: 'Nimbus' }, { column: 'animal', value: 'm03' }]. */
  path: z
    .array(z.object({ column: ColumnName, value: z.string().max(10_000) }))
    .min(1)
    .max(8),
})
export type ExclusionUnit = z.infer<typeof ExclusionUnit>

const Reason = z.string().trim().min(3, { error: 'Write why these rows are left out' }).max(2000)

export const ExclusionCreate = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('rule'), rule: ExclusionRule, reason: Reason }),
  z.object({ kind: z.literal('unit'), unit: ExclusionUnit, reason: Reason }),
])
export type ExclusionCreate = z.infer<typeof ExclusionCreate>

export const Exclusion = z.object({
  id: z.number().int().positive(),
  versionId: z.number().int().positive(),
  kind: z.enum(['rule', 'unit']),
  rule: ExclusionRule.nullable(),
  unit: ExclusionUnit.nullable(),
  reason: z.string(),
  /** Rows this exclusion matches (rows never change, so this is fixed). */
  matchedRows: z.number().int().nonnegative(),
  createdBy: z.object({ id: z.number().int(), name: z.string() }),
  createdAt: z.string(),
  /** Set when the exclusion was withdrawn; withdrawn exclusions stay listed for the record. */
  removedAt: z.string().nullable(),
  removedBy: z.object({ id: z.number().int(), name: z.string() }).nullable(),
})
export type Exclusion = z.infer<typeof Exclusion>

// ---------------------------------------------------------------- versions and datasets

export const VersionStatus = z.enum(['processing', 'ready', 'failed'])

export const DatasetVersionSummary = z.object({
  id: z.number().int().positive(),
  datasetId: z.number().int().positive(),
  versionNo: z.number().int().positive(),
  originalFilename: z.string(),
  byteSize: z.number().int().nonnegative(),
  sha256: z.string(),
  fileType: z.enum(['csv', 'xlsx']),
  encoding: z.string(),
  delimiter: z.string().nullable(),
  decimalMark: z.enum(['.', ',']),
  sheetName: z.string().nullable(),
  sheetNames: z.array(z.string()),
  /** File row of the header; data row k (1-based) is file row headerRow + k. */
  headerRow: z.number().int().positive(),
  rowCount: z.number().int().nonnegative(),
  columnCount: z.number().int().nonnegative(),
  excludedRowCount: z.number().int().nonnegative(),
  status: VersionStatus,
  naValues: z.array(z.string()),
  createdBy: z.object({ id: z.number().int(), name: z.string() }),
  createdAt: z.string(),
  /** How long parsing and storing took on the server, in milliseconds. */
  ingestMs: z.number().int().nonnegative(),
  /** Whether a nesting has been saved for this version (analyses need one). */
  tagged: z.boolean().default(false),
})
export type DatasetVersionSummary = z.infer<typeof DatasetVersionSummary>

export const DatasetVersionDetail = DatasetVersionSummary.extend({
  columns: z.array(ColumnProfile),
  suggestion: NestingSuggestion,
  tagging: Tagging.nullable(),
  exclusions: z.array(Exclusion),
})
export type DatasetVersionDetail = z.infer<typeof DatasetVersionDetail>

export const DatasetSummary = z.object({
  id: z.number().int().positive(),
  labId: z.number().int().positive(),
  labName: z.string(),
  project: z.object({ id: z.number().int().positive(), name: z.string() }),
  name: z.string(),
  description: z.string(),
  createdBy: z.object({ id: z.number().int(), name: z.string() }),
  createdAt: z.string(),
  updatedAt: z.string(),
  deletedAt: z.string().nullable(),
  latestVersion: DatasetVersionSummary.nullable(),
  versionCount: z.number().int().nonnegative(),
})
export type DatasetSummary = z.infer<typeof DatasetSummary>

export const DatasetDetail = DatasetSummary.extend({
  versions: z.array(DatasetVersionSummary),
  /** What the caller may do here; the client hides commands that would answer 403. */
  permissions: z.object({ upload: z.boolean(), edit: z.boolean(), delete: z.boolean() }),
})
export type DatasetDetail = z.infer<typeof DatasetDetail>

export const DatasetListQuery = z.object({
  labId: Id.optional(),
  projectId: Id.optional(),
  /** Admins only: list soft-deleted datasets (of every lab) to restore one. */
  deleted: z
    .enum(['true', 'false'])
    .default('false')
    .transform((v) => v === 'true'),
})

export const DatasetUpdate = z
  .object({
    name: z.string().trim().min(1, { error: 'Give the dataset a name' }).max(200).optional(),
    description: z.string().trim().max(5000).optional(),
    projectId: Id.optional(),
  })
  .refine((v) => v.name !== undefined || v.description !== undefined || v.projectId !== undefined, {
    error: 'Nothing to change',
  })
export type DatasetUpdate = z.infer<typeof DatasetUpdate>

/** Text fields of the multipart upload that creates a dataset (the file goes in the field `file`). */
export const DatasetUploadFields = z
  .object({
    labId: Id,
    projectId: Id.optional(),
    /** Creates the project in the lab when no project of that name exists yet. */
    projectName: z.string().trim().min(1).max(120).optional(),
    name: z.string().trim().min(1).max(200).optional(),
    description: z.string().trim().max(5000).default(''),
    /** XLSX only: sheet name or 1-based number; default the first sheet. */
    sheet: z.string().trim().max(200).optional(),
  })
  .refine((v) => v.projectId !== undefined || v.projectName !== undefined, {
    error: 'Choose a project or name a new one',
    path: ['projectId'],
  })
export type DatasetUploadFields = z.infer<typeof DatasetUploadFields>

export const VersionUploadFields = z.object({ sheet: z.string().trim().max(200).optional() })

export const DatasetParams = z.object({ datasetId: Id })
export const VersionParams = z.object({ datasetId: Id, versionNo: Id })
export const ExclusionParams = z.object({ datasetId: Id, versionNo: Id, exclusionId: Id })

// ---------------------------------------------------------------- preview

export const RowsQuery = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(500).default(50),
  /** Column name; numeric columns sort numerically, missing values last. */
  sortBy: z.string().max(200).optional(),
  sortDesc: z
    .enum(['true', 'false'])
    .default('false')
    .transform((v) => v === 'true'),
  /** Which rows: all, only those kept for analysis, or only excluded ones. */
  show: z.enum(['all', 'included', 'excluded']).default('all'),
})
export type RowsQuery = z.infer<typeof RowsQuery>

export const RowsPage = z.object({
  columns: z.array(z.string()),
  rows: z.array(
    z.object({
      /** Row as a spreadsheet numbers it (the header is row 1). */
      rowNumber: z.number().int(),
      values: z.array(z.string().nullable()),
      /** Ids of the exclusions that leave this row out (empty when it is kept). */
      excludedBy: z.array(z.number().int()),
    }),
  ),
  total: z.number().int().nonnegative(),
  page: z.number().int(),
  pageSize: z.number().int(),
})
export type RowsPage = z.infer<typeof RowsPage>

// ---------------------------------------------------------------- upload progress

export const UploadPhase = z.enum(['receiving', 'checking', 'storing', 'profiling', 'done', 'failed'])

export const UploadProgress = z.object({
  token: z.string(),
  phase: UploadPhase,
  bytesRead: z.number().int().nonnegative(),
  bytesTotal: z.number().int().nonnegative(),
  rowsStored: z.number().int().nonnegative(),
  /** Failure message, as the upload request itself answered it. */
  message: z.string().nullable(),
})
export type UploadProgress = z.infer<typeof UploadProgress>

export const UploadTokenParams = z.object({ token: z.string().regex(/^[A-Za-z0-9_-]{8,64}$/) })
/** Header the client sets on an upload so it can poll GET /api/v1/uploads/:token meanwhile. */
export const UPLOAD_TOKEN_HEADER = 'x-upload-token'
