import type { CurrentUser } from '../../shared/schemas/auth'
import type {
  DatasetDetail,
  DatasetSummary,
  DatasetUpdate,
  DatasetVersionDetail,
} from '../../shared/schemas/datasets'
import { db } from '../db'
import { NotFoundError } from '../errors/app-error'
import { currentTagging, listExclusions } from '../repositories/datasets-annotations.repo'
import {
  findDataset,
  getSuggestion,
  latestVersions,
  listColumns,
  listDatasets,
  listVersions,
  setDatasetDeleted,
  updateDataset,
} from '../repositories/datasets.repo'
import { findProject } from '../repositories/projects.repo'
import { canDeleteDataset, canRestoreDatasets, canWrite, readableLabIds } from '../../shared/access'
import { allowOnly, readable, writable } from '../access/records'

export interface DatasetListFilter {
  labId?: number
  projectId?: number
  deleted: boolean
}

/**
 * Datasets of the caller's labs (optionally one lab or project), newest activity first.
 * `deleted` lists soft-deleted datasets of every lab, for instance administrators restoring one.
 */
export async function listDatasetsFor(
  user: CurrentUser,
  filter: DatasetListFilter,
): Promise<DatasetSummary[]> {
  let labIds: number[] | 'all'
  if (filter.deleted) {
    allowOnly(canRestoreDatasets(user), 'Only instance administrators can list deleted datasets.')
    labIds = filter.labId !== undefined ? [filter.labId] : 'all'
  } else {
    labIds = readableLabIds(user)
    if (filter.labId !== undefined) labIds = labIds.filter((id) => id === filter.labId)
  }
  const datasets = await listDatasets({ labIds, projectId: filter.projectId, deleted: filter.deleted })
  const latest = await latestVersions(datasets.map((d) => d.id))
  return datasets.map((d) => ({ ...d, latestVersion: latest.get(d.id) ?? null }))
}

export async function getDatasetDetail(user: CurrentUser, datasetId: number): Promise<DatasetDetail> {
  const dataset = await readable(user, 'dataset', datasetId)
  const versions = await listVersions(datasetId)
  return {
    ...dataset,
    latestVersion: versions[0] ?? null,
    versions,
    permissions: {
      upload: canWrite(user, dataset.labId),
      edit: canWrite(user, dataset.labId),
      delete: canDeleteDataset(user, { labId: dataset.labId, createdById: dataset.createdBy.id }),
    },
  }
}

export async function getVersionDetail(
  user: CurrentUser,
  datasetId: number,
  versionNo: number,
): Promise<DatasetVersionDetail> {
  const { version } = await readable(user, 'datasetVersion', { datasetId, versionNo })
  const [columns, suggestion, tagging, exclusions] = await Promise.all([
    listColumns(version.id),
    getSuggestion(version.id),
    currentTagging(version.id),
    listExclusions(version.id),
  ])
  if (!suggestion) throw new NotFoundError('This version has no profile yet.')
  return { ...version, columns, suggestion, tagging, exclusions }
}

export async function updateDatasetFor(
  user: CurrentUser,
  datasetId: number,
  changes: DatasetUpdate,
): Promise<DatasetDetail> {
  const dataset = await writable(user, 'dataset', datasetId)
  if (changes.projectId !== undefined) {
    const project = await findProject(changes.projectId)
    if (!project || project.labId !== dataset.labId) throw new NotFoundError('Project not found in this lab.')
  }
  await updateDataset(datasetId, changes)
  return getDatasetDetail(user, datasetId)
}

/** Soft delete: the dataset disappears for its lab; rows, versions and originals stay for a restore. */
export async function deleteDatasetFor(user: CurrentUser, datasetId: number): Promise<void> {
  const dataset = await readable(user, 'dataset', datasetId)
  allowOnly(
    canDeleteDataset(user, { labId: dataset.labId, createdById: dataset.createdBy.id }),
    'Only the person who uploaded this dataset or a PI of the lab can delete it.',
  )
  await setDatasetDeleted(datasetId, user.id)
}

export async function restoreDataset(user: CurrentUser, datasetId: number): Promise<DatasetSummary> {
  allowOnly(canRestoreDatasets(user), 'Only instance administrators can restore deleted datasets.')
  return db.transaction(async (trx) => {
    const dataset = await findDataset(datasetId, trx)
    if (!dataset) throw new NotFoundError('Dataset not found.')
    if (dataset.deletedAt) await setDatasetDeleted(datasetId, null, trx)
    const restored = (await findDataset(datasetId, trx))!
    const latest = await latestVersions([datasetId], trx)
    return { ...restored, latestVersion: latest.get(datasetId) ?? null }
  })
}

/** The stored original file of a version the user may read: its SHA-256 and the name it was uploaded as. */
export async function originalOf(
  user: CurrentUser,
  datasetId: number,
  versionNo: number,
): Promise<{ sha256: string; originalFilename: string }> {
  const { version } = await readable(user, 'datasetVersion', { datasetId, versionNo })
  return { sha256: version.sha256, originalFilename: version.originalFilename }
}
