import type { CurrentUser } from '../../shared/schemas/auth'
import type { AnalysisResult } from '../../shared/schemas/analysis-result'
import { rRowsCsvChunks } from '../analysis/r-rows-csv'
import { rExportColumns, rRowsFilename, rScript, rScriptFilename } from '../analysis/r-script'
import { ConflictError, NotFoundError } from '../errors/app-error'
import {
  findAnalysisVersion,
  findAnalysisVersionResult,
  type AnalysisVersionRecord,
} from '../repositories/analyses.repo'
import { finishedVersionFor } from './analyses.service'
import { loadNestedColumns } from '../rows-store/read-back'
import { sharedVersionWithRows } from './share-links.service'

/** One version's "check it in R" export: the script, and the rows it reads (streamed). */
export interface RExport {
  script: { filename: string; body: string }
  rows: { filename: string; chunks: () => Promise<Iterable<string>> }
}

function exportOf(analysisName: string, version: AnalysisVersionRecord, result: AnalysisResult): RExport {
  const dataFile = rRowsFilename(analysisName, version.versionNo)
  const { settings } = version
  const columns = rExportColumns(result, settings)
  return {
    script: {
      filename: rScriptFilename(analysisName, version.versionNo),
      body: rScript({
        analysisName,
        versionNo: version.versionNo,
        result,
        dataFile,
        engineVersion: version.engineVersion,
        datasetSha256: version.datasetVersion.sha256,
        columns,
      }),
    },
    rows: {
      filename: dataFile,
      // Read back from the stored rows with the exclusions recorded with this version, as the run did.
      chunks: async () =>
        rRowsCsvChunks(
          await loadNestedColumns(
            version.datasetVersion.id,
            {
              response: columns.response,
              family: settings.family,
              trials: columns.trials,
              positive: settings.positive,
              levels: columns.levels,
              conditions: columns.conditions,
              covariates: columns.covariates,
            },
            version.exclusions,
          ),
          columns,
        ),
    },
  }
}

async function resultOf(version: AnalysisVersionRecord): Promise<AnalysisResult> {
  const { result } = await findAnalysisVersionResult(version.id)
  if (!result) throw new ConflictError('This version has no stored result to check.')
  return result
}

/** The R export of a finished version the caller may read (404 outside their labs, 409 while it runs). */
export async function rExportFor(user: CurrentUser, analysisId: number, versionNo: number): Promise<RExport> {
  const { analysis, version } = await finishedVersionFor(user, analysisId, versionNo, 'R export')
  return exportOf(analysis.name, version, await resultOf(version))
}

/** The R export through a read-only link, only when its creator allowed the unit table. */
export async function sharedRExport(token: string): Promise<RExport> {
  const shared = await sharedVersionWithRows(token)
  const version = await findAnalysisVersion(shared.analysisId, shared.versionNo)
  if (!version) throw new NotFoundError('This link does not work (it may have expired or been withdrawn).')
  return exportOf(shared.analysisName, version, await resultOf(version))
}
