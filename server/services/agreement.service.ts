import type { AgreementResult } from '../../shared/schemas/agreement'
import type { CurrentUser } from '../../shared/schemas/auth'
import { EngineInputError } from '../../shared/stats/engine-input-error'
import { labAgreement } from '../../shared/analysis/lab-agreement'
import { crossFactors, referenceCell } from '../analysis/design-cells'
import { NotFoundError, UnprocessableError } from '../errors/app-error'
import { findAnalysisVersion } from '../repositories/analyses.repo'
import { readable } from '../access/records'
import { loadNestedColumns } from '../rows-store/read-back'

/**
 * Agreement between the outermost units (labs) of a finished analysis version, recomputed from
 * the version's rows with its recorded exclusions. Lab members read; elsewhere 404; a design
 * with fewer than 3 outer units or no inner level is 422. With two condition factors the groups
 * compared are the design cells ("WT:vehicle"); covariates play no part in agreement.
 */
export async function agreementFor(
  user: CurrentUser,
  analysisId: number,
  versionNo: number,
): Promise<AgreementResult> {
  await readable(user, 'analysis', analysisId)
  const version = await findAnalysisVersion(analysisId, versionNo)
  if (!version) throw new NotFoundError(`Version ${versionNo} of this analysis not found.`)
  if (version.status !== 'done') throw new UnprocessableError('This analysis version has not finished yet.')
  const { settings } = version
  const columns = await loadNestedColumns(
    version.datasetVersion.id,
    { response: settings.response, conditions: settings.conditions, covariates: [], levels: settings.levels },
    version.exclusions,
  )
  // Two condition factors: each design cell is one group, as ISO 5725 takes each material level.
  const factors = columns.factors ?? []
  const grouped =
    factors.length === 2 ? { ...columns, factors: [crossFactors(factors[0], factors[1])] } : columns
  try {
    return {
      analysisId,
      versionNo,
      ...labAgreement(grouped, { reference: referenceCell(factors, settings.reference) }),
    }
  } catch (error) {
    if (error instanceof EngineInputError) throw new UnprocessableError(error.message)
    throw error
  }
}
