import {
  canRead,
  canWrite,
  membershipIn,
  writeRefusal,
  WRITER_ROLES,
  type AccessUser,
  type WriteSubject,
} from '../../shared/access'
import type { Membership } from '../../shared/schemas/auth'
import type { Project } from '../../shared/schemas/datasets'
import { ForbiddenError, NotFoundError } from '../errors/app-error'
import { findAnalysis, type AnalysisRecord } from '../repositories/analyses.repo'
import { defaultConn, type Conn } from '../repositories/connection'
import {
  findDataset,
  findVersion,
  type DatasetRecord,
  type VersionRecord,
} from '../repositories/datasets.repo'
import { findPlan, type PlanRecord } from '../repositories/plans.repo'
import { findProject } from '../repositories/projects.repo'
import {
  findReviewableVersion,
  findReviewRequest,
  type ReviewableVersion,
  type ReviewRequestRecord,
} from '../repositories/reviews.repo'

/**
 * Records loaded for a person, with the two rules every use case starts from applied here once:
 * a record outside the person's labs (or one that does not exist, or a deleted dataset) answers
 * 404 with the same words, so nobody learns what exists in other labs; `writable` then answers a
 * member whose role may not change it with 403, saying which role it needs. Rules about a record's
 * own facts (who may delete, share, sign off) are in shared/access and checked by the use case.
 */
interface Kinds {
  lab: { key: number; record: Membership }
  dataset: { key: number; record: DatasetRecord }
  datasetVersion: {
    key: { datasetId: number; versionNo: number }
    record: { dataset: DatasetRecord; version: VersionRecord }
  }
  analysis: { key: number; record: AnalysisRecord }
  analysisVersion: { key: { analysisId: number; versionNo: number }; record: ReviewableVersion }
  plan: { key: number; record: PlanRecord }
  project: { key: number; record: Project }
  reviewRequest: { key: number; record: ReviewRequestRecord }
}

export type RecordKind = keyof Kinds
export type RecordKey<K extends RecordKind> = Kinds[K]['key']
export type LoadedRecord<K extends RecordKind> = Kinds[K]['record']

interface KindAccess<K extends RecordKind> {
  /** The record, whoever asks (undefined when it does not exist or counts as gone). */
  load(key: RecordKey<K>, conn: Conn, user: AccessUser): Promise<LoadedRecord<K> | undefined>
  labOf(record: LoadedRecord<K>): number
  notFound(key: RecordKey<K>): string
  /** Whose writing role changes it (the refusal names it); absent: not changed through `writable`. */
  writeSubject?: WriteSubject
}

const kinds: { [K in RecordKind]: KindAccess<K> } = {
  lab: {
    load: async (labId, _conn, user) => membershipIn(user, labId),
    labOf: (membership) => membership.labId,
    notFound: () => 'Lab not found.',
  },
  dataset: {
    load: async (id, conn) => {
      const dataset = await findDataset(id, conn)
      return dataset && !dataset.deletedAt ? dataset : undefined
    },
    labOf: (dataset) => dataset.labId,
    notFound: () => 'Dataset not found.',
    writeSubject: 'dataset',
  },
  datasetVersion: {
    load: async ({ datasetId, versionNo }, conn) => {
      const dataset = await findDataset(datasetId, conn)
      if (!dataset || dataset.deletedAt) return undefined
      const version = await findVersion(datasetId, versionNo, conn)
      return version && version.status === 'ready' ? { dataset, version } : undefined
    },
    labOf: ({ dataset }) => dataset.labId,
    notFound: ({ versionNo }) => `Version ${versionNo} of this dataset not found.`,
    writeSubject: 'dataset',
  },
  analysis: {
    load: (id, conn) => findAnalysis(id, conn),
    labOf: (analysis) => analysis.labId,
    notFound: () => 'Analysis not found.',
    writeSubject: 'analysis',
  },
  analysisVersion: {
    load: ({ analysisId, versionNo }, conn) => findReviewableVersion(analysisId, versionNo, conn),
    labOf: (version) => version.labId,
    notFound: () => 'Analysis version not found.',
  },
  plan: {
    load: (id, conn) => findPlan(id, conn),
    labOf: (plan) => plan.labId,
    notFound: () => 'Plan not found.',
    writeSubject: 'plan',
  },
  project: {
    load: (id, conn) => findProject(id, conn),
    labOf: (project) => project.labId,
    notFound: () => 'Project not found.',
    writeSubject: 'project',
  },
  reviewRequest: {
    load: (id, conn) => findReviewRequest(id, conn),
    labOf: (request) => request.labId,
    notFound: () => 'Review request not found.',
  },
}

/** The record if the person is a member of its lab; 404 otherwise. */
export async function readable<K extends RecordKind>(
  user: AccessUser,
  kind: K,
  key: RecordKey<K>,
  conn: Conn = defaultConn,
): Promise<LoadedRecord<K>> {
  const access = kinds[kind] as KindAccess<K>
  const record = await access.load(key, conn, user)
  if (record === undefined || !canRead(user, access.labOf(record)))
    throw new NotFoundError(access.notFound(key))
  return record
}

/** 403 naming the role it needs, unless the person may write in the lab (they are a member). */
export function assertWriter(user: AccessUser, labId: number, subject: WriteSubject): void {
  if (canWrite(user, labId)) return
  const membership = membershipIn(user, labId)!
  throw new ForbiddenError(writeRefusal(subject, membership.labName), {
    requiredRoles: WRITER_ROLES,
    yourRole: membership.role,
  })
}

/**
 * The record if the person may change it: 404 outside their labs, 403 for a member whose role may
 * not. A lab is written to for a subject: `writable(user, 'lab', labId, { subject: 'plan' })`.
 */
export async function writable<K extends RecordKind>(
  user: AccessUser,
  kind: K,
  key: RecordKey<K>,
  options: { conn?: Conn; subject?: WriteSubject } = {},
): Promise<LoadedRecord<K>> {
  const access = kinds[kind] as KindAccess<K>
  const subject = options.subject ?? access.writeSubject
  if (!subject) throw new Error(`${kind} records are not changed through writable()`)
  const record = await readable(user, kind, key, options.conn)
  assertWriter(user, access.labOf(record), subject)
  return record
}

/** 403 with `message` unless a rule of shared/access allowed it. */
export function allowOnly(allowed: boolean, message: string, details?: unknown): void {
  if (!allowed) throw new ForbiddenError(message, details)
}
