import type { CurrentUser } from '../../shared/schemas/auth'
import type { ColumnProfile, RowsPage, RowsQuery } from '../../shared/schemas/datasets'
import { InvalidPayloadError } from '../errors/app-error'
import { activeExclusions } from '../repositories/datasets-annotations.repo'
import { pageRows } from '../rows-store/row-queries'
import { listColumns } from '../repositories/datasets.repo'
import { readable } from '../access/records'
import { fileRow, shapeOf } from '../rows-store/read-back'

/** One page of stored rows, sorted on the server, with the exclusions that leave each row out. */
export async function previewRows(
  user: CurrentUser,
  datasetId: number,
  versionNo: number,
  query: RowsQuery,
): Promise<RowsPage> {
  const { version } = await readable(user, 'datasetVersion', { datasetId, versionNo })
  const shape = await shapeOf(version)
  let sortPosition: number | null = null
  let sortNumeric = false
  if (query.sortBy !== undefined) {
    const column = shape.columns.get(query.sortBy)
    if (!column)
      throw new InvalidPayloadError(`There is no column “${query.sortBy}” to sort by.`, {
        issues: [{ path: 'query.sortBy', message: 'Unknown column' }],
      })
    sortPosition = column.position
    sortNumeric = column.type === 'integer' || column.type === 'numeric'
  }
  const exclusions = await activeExclusions(version.id)
  const rows = await pageRows(shape, {
    offset: (query.page - 1) * query.pageSize,
    limit: query.pageSize,
    sortPosition,
    sortNumeric,
    sortDesc: query.sortDesc,
    show: query.show,
    exclusions,
    columnCount: version.columnCount,
  })
  const total =
    query.show === 'all'
      ? version.rowCount
      : query.show === 'excluded'
        ? version.excludedRowCount
        : version.rowCount - version.excludedRowCount
  const columns = [...shape.columns.entries()]
    .sort((a, b) => a[1].position - b[1].position)
    .map(([name]) => name)
  return {
    columns,
    rows: rows.map((r) => ({
      rowNumber: fileRow(version, r.rowNo),
      values: r.values,
      excludedBy: r.excludedBy,
    })),
    total,
    page: query.page,
    pageSize: query.pageSize,
  }
}

export async function columnSummary(
  user: CurrentUser,
  datasetId: number,
  versionNo: number,
): Promise<ColumnProfile[]> {
  const { version } = await readable(user, 'datasetVersion', { datasetId, versionNo })
  return listColumns(version.id)
}
