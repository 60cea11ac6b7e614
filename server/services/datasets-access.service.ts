import type { CurrentUser, Membership, Role } from '../../shared/schemas/auth'
import { ForbiddenError, NotFoundError } from '../errors/app-error'
import {
  findDataset,
  findVersion,
  type DatasetRecord,
  type VersionRecord,
} from '../repositories/datasets.repo'
import type { Conn } from '../repositories/connection'
import { defaultConn } from '../repositories/connection'

/**
 * Who may do what with datasets. Every member of the lab reads; scientists and PIs upload, tag and
 * exclude; deleting is for the author or a PI; restoring for instance administrators. Outside the
 * caller's labs everything answers 404, so nobody learns which datasets exist elsewhere.
 */
export const WRITER_ROLES: readonly Role[] = ['scientist', 'pi']

export function membershipIn(user: CurrentUser, labId: number): Membership | undefined {
  return user.memberships.find((m) => m.labId === labId)
}

export function readableLabIds(user: CurrentUser): number[] {
  return user.memberships.map((m) => m.labId)
}

export function canWrite(user: CurrentUser, labId: number): boolean {
  const membership = membershipIn(user, labId)
  return !!membership && WRITER_ROLES.includes(membership.role)
}

export function canDelete(user: CurrentUser, dataset: Pick<DatasetRecord, 'labId' | 'createdBy'>): boolean {
  const membership = membershipIn(user, dataset.labId)
  return !!membership && (membership.role === 'pi' || dataset.createdBy.id === user.id)
}

/** 404 outside the user's labs, 403 for a member whose role may not write. */
export function assertCanWriteInLab(user: CurrentUser, labId: number, what = 'Lab'): Membership {
  const membership = membershipIn(user, labId)
  if (!membership) throw new NotFoundError(`${what} not found.`)
  if (!WRITER_ROLES.includes(membership.role)) {
    throw new ForbiddenError(
      `Uploading, tagging and excluding need the role scientist or PI in ${membership.labName}.`,
      {
        requiredRoles: WRITER_ROLES,
        yourRole: membership.role,
      },
    )
  }
  return membership
}

export type DatasetAction = 'read' | 'write' | 'delete'

/** The dataset if the user may perform `action` on it; deleted datasets are invisible here. */
export async function datasetFor(
  user: CurrentUser,
  datasetId: number,
  action: DatasetAction,
  conn: Conn = defaultConn,
): Promise<DatasetRecord> {
  const dataset = await findDataset(datasetId, conn)
  if (!dataset || dataset.deletedAt || !membershipIn(user, dataset.labId))
    throw new NotFoundError('Dataset not found.')
  if (action === 'write') assertCanWriteInLab(user, dataset.labId, 'Dataset')
  if (action === 'delete' && !canDelete(user, dataset)) {
    throw new ForbiddenError('Only the person who uploaded this dataset or a PI of the lab can delete it.')
  }
  return dataset
}

export async function versionFor(
  user: CurrentUser,
  datasetId: number,
  versionNo: number,
  action: DatasetAction,
  conn: Conn = defaultConn,
): Promise<{ dataset: DatasetRecord; version: VersionRecord }> {
  const dataset = await datasetFor(user, datasetId, action, conn)
  const version = await findVersion(datasetId, versionNo, conn)
  if (!version || version.status !== 'ready')
    throw new NotFoundError(`Version ${versionNo} of this dataset not found.`)
  return { dataset, version }
}
