import type { AnalysisResult, BootstrapResult } from '../../shared/schemas/analysis-result'
import { bootstrapForResult } from '../../shared/stats/bootstrap-for-result'
import { prepareNestedDesign } from '../../shared/stats/prepare-nested-design'
import type { NestedColumns } from '../../shared/stats/types'

/** Confidence of the bootstrap interval; analyzeNested uses the same for every interval. */
const CONFIDENCE = 0.95

/**
 * The bootstrap part of the result, computed on its own so a run can report the bootstrap as a
 * stage of its own (analyzeNested offers no progress callback). Same design, same pairs, same
 * seed and confidence as analyzeNested's own bootstrap, through the same bootstrapForResult;
 * bootstrap-section.test.ts checks that the two agree exactly, so this cannot drift from the
 * engine unnoticed.
 */
export function bootstrapSection(
  columns: NestedColumns,
  result: Pick<AnalysisResult, 'reference' | 'comparisons'>,
  settings: { resamples: number; seed: string },
): BootstrapResult {
  const design = prepareNestedDesign(
    columns,
    result.reference === null ? {} : { reference: result.reference },
  )
  const contrasts = result.comparisons.mixedModel?.contrasts ?? []
  return bootstrapForResult(design, contrasts, { ...settings, confidence: CONFIDENCE })
}
