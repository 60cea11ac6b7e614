import { recordAudit } from './audit.service'
import type { CurrentUser } from '../../shared/schemas/auth'
import type {
  ColumnType,
  DesignSummary,
  Exclusion,
  Tagging,
  TaggingInput,
} from '../../shared/schemas/datasets'
import { describeDesign, type DesignFacts } from '../../shared/nesting/describe-design'
import { db } from '../db'
import { InvalidPayloadError, NotFoundError, UnprocessableError } from '../errors/app-error'
import {
  activeExclusions,
  currentTagging,
  insertTagging,
  taggingHistory,
} from '../repositories/datasets-annotations.repo'
import {
  countRowsWhere,
  excludedSql,
  exclusionSql,
  firstNonNumberRow,
  firstRowsOfDistinctValues,
  type RowTableShape,
} from '../rows-store/row-queries'
import { parseNumberText } from '../rows-store/number-text'
import { touchDataset, type VersionRecord } from '../repositories/datasets.repo'
import { readable, writable } from '../access/records'
import { fileRow, readColumns, shapeOf } from '../rows-store/read-back'

const q = (name: string) => `“${name}”`

export interface TaggingResult {
  tagging: Tagging
  design: DesignSummary
}

/** The design facts of a nesting over the version's kept rows (one read-back of the level and condition columns). */
async function designOf(
  version: VersionRecord,
  shape: RowTableShape,
  exclusions: readonly Exclusion[],
  levels: readonly string[],
  condition: string | null,
) {
  const read = await readColumns(
    version,
    shape,
    [...levels, ...(condition ? [condition] : [])].map((name) => ({ name, as: 'factor' as const })),
    exclusions,
  )
  const coded = (name: string) => {
    const column = read.factors.get(name)!
    return { name, codes: column.codes, labels: column.labels }
  }
  const facts = describeDesign({
    rowCount: read.count,
    levels: levels.map(coded),
    condition: condition ? coded(condition) : null,
  })
  return { facts, read }
}

/**
 * The design as the screens show it, with how many kept rows each response column leaves empty:
 * the dataset's count and an analysis's count then add up ("3 rows have no soma_area_um2").
 */
async function publicDesign(
  facts: DesignFacts,
  shape: RowTableShape,
  exclusions: readonly Pick<Exclusion, 'kind' | 'rule' | 'unit'>[],
  responseColumns: readonly string[],
): Promise<DesignSummary> {
  const { missingLabel: _label, missingCondition: _condition, ...design } = facts
  const kept = `NOT ${excludedSql(shape, exclusions)}`
  const missingValues: DesignSummary['missingValues'] = []
  for (const column of responseColumns) {
    const missing = exclusionSql(shape, {
      kind: 'rule',
      rule: { column, operator: 'missing', value: null },
      unit: null,
    })
    const rows = await countRowsWhere(shape, `${kept} AND coalesce(${missing}, false)`)
    if (rows > 0) missingValues.push({ column, rows })
  }
  return { ...design, missingValues }
}

/**
 * Checks a nesting against the data before saving it, so analyses never meet these problems:
 * unknown columns, a response that is neither numeric nor two-valued text (see checkTextResponse), rows
 * without a label, levels that do not split their parent or that are the observations themselves,
 * a condition with one value, and a condition arm with a single independent unit.
 */
async function validate(
  version: VersionRecord,
  shape: RowTableShape,
  exclusions: readonly Exclusion[],
  input: TaggingInput,
): Promise<DesignFacts> {
  const all = [
    ...input.responseColumns,
    ...input.levels,
    ...(input.conditionColumn ? [input.conditionColumn] : []),
  ]
  const unknown = all.filter((name) => !shape.columns.has(name))
  if (unknown.length) {
    throw new InvalidPayloadError(`This version has no column ${unknown.map(q).join(', ')}.`, {
      issues: unknown.map((name) => ({ path: 'columns', message: `Unknown column ${name}` })),
    })
  }
  const excluded = excludedSql(shape, exclusions)
  for (const name of input.responseColumns) {
    const column = shape.columns.get(name)!
    if (column.type === 'empty')
      throw new InvalidPayloadError(`${q(name)} cannot be a response: it has no values.`, { column: name })
    if (column.type === 'text') await checkTextResponse(version, shape, name, column, excluded)
  }
  const { facts, read } = await designOf(version, shape, exclusions, input.levels, input.conditionColumn)
  if (facts.observationCount === 0) throw new UnprocessableError('No rows are left after the exclusions.')
  if (facts.missingLabel) {
    const row = fileRow(version, read.rowNos[facts.missingLabel.rowIndex])
    const { column } = facts.missingLabel
    throw new UnprocessableError(
      `Row ${row} has no value in ${q(column)}. Every row needs a label at each level; exclude such rows with the rule “${column} is missing”.`,
      { column, row },
    )
  }
  facts.levels.forEach((level, d) => {
    const parent = d === 0 ? null : facts.levels[d - 1]
    if (parent && level.unitCount === parent.unitCount) {
      throw new UnprocessableError(
        `${q(level.column)} does not split ${q(parent.column)}: each ${q(parent.column)} unit has exactly one ${q(level.column)} unit, so the two levels cannot be told apart. Leave one of them out.`,
        { column: level.column },
      )
    }
    if (level.unitCount === facts.observationCount) {
      throw new UnprocessableError(
        `Every ${q(level.column)} unit has a single row: that level is the observations themselves. Leave it out of the levels.`,
        { column: level.column },
      )
    }
  })
  if (input.conditionColumn) {
    const name = input.conditionColumn
    if (facts.missingCondition) {
      const row = fileRow(version, read.rowNos[facts.missingCondition.rowIndex])
      throw new UnprocessableError(
        `Row ${row} has no value in the condition ${q(name)}. Exclude such rows with the rule “${name} is missing”, or correct the file.`,
        { column: name, row },
      )
    }
    if (facts.arms.length < 2) {
      throw new UnprocessableError(
        `The condition ${q(name)} has a single value (“${facts.arms[0]?.value ?? ''}”) in the rows kept: there is nothing to compare.`,
        { column: name },
      )
    }
    if (facts.conditionLevel) {
      const thin = facts.arms.find((arm) => arm.unitCount < 2)
      if (thin) {
        throw new UnprocessableError(
          `“${thin.value}” has only one ${q(facts.conditionLevel)} unit in the rows kept. Comparing conditions needs at least two independent units in each; with one, the spread between units cannot be estimated.`,
          { column: name, value: thin.value },
        )
      }
    }
  }
  return facts
}

/**
 * A response column profiled as text is accepted when its kept rows hold only numbers (text crept
 * in only in excluded rows), or exactly two distinct values: a yes/no response, analysed as
 * binomial. Missing cells are left out, as for numbers. Otherwise 400 naming the column and a row:
 * when numbers are among its first values (even two values, one a number: a measurement and a note), the first kept row that is not a number (a numbers
 * column with stray text); else the row of a third value, or the single value there is.
 */
async function checkTextResponse(
  version: VersionRecord,
  shape: RowTableShape,
  name: string,
  column: { position: number; type: ColumnType },
  excluded: string,
): Promise<void> {
  const offending = await firstNonNumberRow(shape, column.position, excluded)
  if (!offending) return
  const firsts = await firstRowsOfDistinctValues(shape, column, excluded, 3)
  const isNumber = (text: string) => Number.isFinite(parseNumberText(text, version.decimalMark))
  // Checked first: “5” and “n.d.” are two values, but a measurement with a note, not yes/no.
  if (firsts.some((f) => isNumber(f.value))) {
    const row = fileRow(version, offending.rowNo)
    throw new InvalidPayloadError(
      `${q(name)} cannot be a response: row ${row} holds “${offending.value}”, which is not a number. Correct the file, or exclude such rows first.`,
      { column: name, row },
    )
  }
  if (firsts.length === 2) return
  const rule = 'As text, a response must hold exactly two values (yes/no).'
  if (firsts.length < 2) {
    const row = fileRow(version, offending.rowNo)
    throw new InvalidPayloadError(
      `${q(name)} cannot be a response: it holds a single value (“${offending.value}”) in the rows kept. ${rule}`,
      { column: name, row },
    )
  }
  const [a, b, third] = firsts
  const row = fileRow(version, third.rowNo)
  throw new InvalidPayloadError(
    `${q(name)} cannot be a response: row ${row} holds “${third.value}”, a third value besides “${a.value}” and “${b.value}”. ${rule} Correct the file, or exclude such rows first.`,
    { column: name, row, values: [a.value, b.value, third.value] },
  )
}

export async function getTagging(
  user: CurrentUser,
  datasetId: number,
  versionNo: number,
): Promise<Tagging | null> {
  const { version } = await readable(user, 'datasetVersion', { datasetId, versionNo })
  return currentTagging(version.id)
}

export async function getTaggingHistory(
  user: CurrentUser,
  datasetId: number,
  versionNo: number,
): Promise<Tagging[]> {
  const { version } = await readable(user, 'datasetVersion', { datasetId, versionNo })
  return taggingHistory(version.id)
}

/** Saves a checked nesting as the version's current tagging; earlier taggings remain as history. */
export async function saveTagging(
  user: CurrentUser,
  datasetId: number,
  versionNo: number,
  input: TaggingInput,
): Promise<TaggingResult> {
  const { dataset, version } = await writable(user, 'datasetVersion', { datasetId, versionNo })
  const shape = await shapeOf(version)
  const exclusions = await activeExclusions(version.id)
  const facts = await validate(version, shape, exclusions, input)
  const tagging = await db.transaction(async (trx) => {
    await insertTagging(
      {
        versionId: version.id,
        responseColumns: input.responseColumns,
        conditionColumn: input.conditionColumn,
        levels: input.levels,
        carriedOver: false,
        createdBy: user.id,
      },
      trx,
    )
    await touchDataset(datasetId, trx)
    await recordAudit(trx, {
      actorUserId: user.id,
      labId: dataset.labId,
      action: 'dataset.tagging_changed',
      subjectType: 'dataset',
      subjectId: datasetId,
      details: { versionNo, ...input },
    })
    return (await currentTagging(version.id, trx))!
  })
  return { tagging, design: await publicDesign(facts, shape, exclusions, input.responseColumns) }
}

/** The current tagging's design over the rows kept now (exclusions may have changed since tagging). */
export async function getDesign(
  user: CurrentUser,
  datasetId: number,
  versionNo: number,
): Promise<DesignSummary> {
  const { version } = await readable(user, 'datasetVersion', { datasetId, versionNo })
  const tagging = await currentTagging(version.id)
  if (!tagging) throw new NotFoundError('This version has no tagging yet.')
  const shape = await shapeOf(version)
  const exclusions = await activeExclusions(version.id)
  const { facts } = await designOf(version, shape, exclusions, tagging.levels, tagging.conditionColumn)
  return publicDesign(facts, shape, exclusions, tagging.responseColumns)
}
