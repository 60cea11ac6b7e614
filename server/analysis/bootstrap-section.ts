import type { AnalysisResult, BootstrapResult } from '../../shared/schemas/analysis-result'
import { hierarchicalBootstrap } from '../../shared/stats/hierarchical-bootstrap'
import { prepareNestedDesign } from '../../shared/stats/prepare-nested-design'
import type { NestedColumns } from '../../shared/stats/types'

/** Confidence of the bootstrap interval; analyzeNested uses the same for every interval. */
const CONFIDENCE = 0.95

/**
 * The bootstrap part of the result, computed on its own so a run can report the bootstrap as a
 * stage of its own (analyzeNested offers no progress callback). Same design, same pairs, same
 * seed and confidence as analyzeNested's own bootstrap; bootstrap-section.test.ts checks that
 * the two agree exactly, so this cannot drift from the engine unnoticed.
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
  const labels = design.condition?.labels ?? ['all']
  const contrasts = result.comparisons.mixedModel?.contrasts ?? []
  const boot = hierarchicalBootstrap(design, {
    resamples: settings.resamples,
    seed: settings.seed,
    confidence: CONFIDENCE,
    pairs: contrasts.map(({ a, b }) => [labels.indexOf(a), labels.indexOf(b)] as [number, number]),
  })
  return {
    resamples: boot.resamples,
    seed: boot.seed,
    confidence: boot.confidence,
    exactBelow: boot.exactBelow,
    approximatedGroups: boot.approximatedGroups,
    innermostGroups: boot.innermostGroups,
    groups: boot.conditions.map((c) => ({
      condition: c.label,
      estimate: c.observed,
      se: c.se,
      ciLow: c.ci[0],
      ciHigh: c.ci[1],
    })),
    contrasts: boot.differences.map((d) => ({
      a: d.a,
      b: d.b,
      estimate: d.observed,
      se: d.se,
      ciLow: d.ci[0],
      ciHigh: d.ci[1],
      p: d.pBootstrap,
    })),
  }
}
