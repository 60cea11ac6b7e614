import { recordAudit } from './audit.service'
import type { CurrentUser } from '../../shared/schemas/auth'
import type { Exclusion, ExclusionCreate, ExclusionRule } from '../../shared/schemas/datasets'
import { db } from '../db'
import { ConflictError, InvalidPayloadError, NotFoundError, UnprocessableError } from '../errors/app-error'
import { parseNumberText } from '../rows-store/number-text'
import {
  activeExclusions,
  findExclusion,
  insertExclusion,
  listExclusions,
  markExclusionRemoved,
} from '../repositories/datasets-annotations.repo'
import { countRowsWhere, exclusionSql, excludedSql, type RowTableShape } from '../rows-store/row-queries'
import { lockVersion, setExcludedRowCount, type VersionRecord } from '../repositories/datasets.repo'
import type { Conn } from '../repositories/connection'
import { readable, writable } from '../access/records'
import { shapeOf } from '../rows-store/read-back'

/** Checks a rule against the version's columns; numeric columns get their value as a number. */
function normaliseRule(shape: RowTableShape, version: VersionRecord, rule: ExclusionRule): ExclusionRule {
  const column = shape.columns.get(rule.column)
  if (!column)
    throw new InvalidPayloadError(`There is no column “${rule.column}” in this version.`, {
      issues: [{ path: 'rule.column', message: 'Unknown column' }],
    })
  if (rule.operator === 'missing') return { column: rule.column, operator: 'missing', value: null }
  const numeric = column.type === 'integer' || column.type === 'numeric'
  if (numeric) {
    const value =
      typeof rule.value === 'number'
        ? rule.value
        : parseNumberText(String(rule.value).trim(), version.decimalMark)
    if (!Number.isFinite(value)) {
      throw new InvalidPayloadError(`“${rule.column}” holds numbers; “${rule.value}” is not one.`, {
        issues: [{ path: 'rule.value', message: 'Enter a number' }],
      })
    }
    return { column: rule.column, operator: rule.operator, value }
  }
  if (rule.operator !== 'eq' && rule.operator !== 'ne') {
    throw new InvalidPayloadError(
      `“${rule.column}” holds text, which can only be compared with “equals” or “is not”.`,
      { issues: [{ path: 'rule.operator', message: 'Use equals or is not' }] },
    )
  }
  return { column: rule.column, operator: rule.operator, value: String(rule.value).trim() }
}

/** Recounts the rows left out by all active exclusions; rows never change, so this is exact. */
async function refreshExcludedCount(shape: RowTableShape, versionId: number, conn: Conn): Promise<void> {
  const active = await activeExclusions(versionId, conn)
  await setExcludedRowCount(
    versionId,
    active.length ? await countRowsWhere(shape, excludedSql(shape, active), conn) : 0,
    conn,
  )
}

export async function listVersionExclusions(
  user: CurrentUser,
  datasetId: number,
  versionNo: number,
): Promise<Exclusion[]> {
  const { version } = await readable(user, 'datasetVersion', { datasetId, versionNo })
  return listExclusions(version.id)
}

/**
 * Leaves rows out of analyses by a rule or by a unit, with a written reason. Rows stay stored.
 * A unit that matches no row is refused (a typo would otherwise exclude nothing silently).
 */
export async function addExclusion(
  user: CurrentUser,
  datasetId: number,
  versionNo: number,
  input: ExclusionCreate,
): Promise<Exclusion> {
  const { dataset, version } = await writable(user, 'datasetVersion', { datasetId, versionNo })
  const shape = await shapeOf(version)
  const rule = input.kind === 'rule' ? normaliseRule(shape, version, input.rule) : null
  const unit =
    input.kind === 'unit'
      ? { path: input.unit.path.map((s) => ({ column: s.column, value: s.value.trim() })) }
      : null
  if (unit) {
    for (const step of unit.path) {
      if (!shape.columns.has(step.column))
        throw new InvalidPayloadError(`There is no column “${step.column}” in this version.`, {
          issues: [{ path: 'unit.path', message: 'Unknown column' }],
        })
    }
  }
  return db.transaction(async (trx) => {
    await lockVersion(version.id, trx)
    const matchedRows = await countRowsWhere(
      shape,
      `coalesce(${exclusionSql(shape, { kind: input.kind, rule, unit })}, false)`,
      trx,
    )
    if (unit && matchedRows === 0) {
      throw new UnprocessableError(
        `No rows belong to the unit ${unit.path.map((s) => `${s.column} “${s.value}”`).join(' › ')}. Check the spelling.`,
      )
    }
    const id = await insertExclusion(
      {
        versionId: version.id,
        kind: input.kind,
        rule,
        unit,
        reason: input.reason,
        matchedRows,
        createdBy: user.id,
      },
      trx,
    )
    await refreshExcludedCount(shape, version.id, trx)
    await recordAudit(trx, {
      actorUserId: user.id,
      labId: dataset.labId,
      action: 'dataset.exclusion_added',
      subjectType: 'dataset',
      subjectId: datasetId,
      details: { versionNo, exclusionId: id, kind: input.kind, reason: input.reason, matchedRows },
    })
    return (await findExclusion(version.id, id, trx))!
  })
}

/** Withdraws an exclusion: its rows count again; the exclusion stays on record as withdrawn. */
export async function withdrawExclusion(
  user: CurrentUser,
  datasetId: number,
  versionNo: number,
  exclusionId: number,
): Promise<Exclusion> {
  const { dataset, version } = await writable(user, 'datasetVersion', { datasetId, versionNo })
  const shape = await shapeOf(version)
  return db.transaction(async (trx) => {
    await lockVersion(version.id, trx)
    const exclusion = await findExclusion(version.id, exclusionId, trx)
    if (!exclusion) throw new NotFoundError('Exclusion not found.')
    if (exclusion.removedAt) throw new ConflictError('This exclusion was already withdrawn.')
    await markExclusionRemoved(exclusionId, user.id, trx)
    await refreshExcludedCount(shape, version.id, trx)
    await recordAudit(trx, {
      actorUserId: user.id,
      labId: dataset.labId,
      action: 'dataset.exclusion_withdrawn',
      subjectType: 'dataset',
      subjectId: datasetId,
      details: { versionNo, exclusionId },
    })
    return (await findExclusion(version.id, exclusionId, trx))!
  })
}
