import type { BootstrapResult } from '../schemas/analysis-result'
import { hierarchicalBootstrap, type BootstrapInput } from '../stats/hierarchical-bootstrap'
import type { NestedDesign } from '../stats/types'
import type { AnalyzeNestedOptions } from './analyze-options'

/**
 * The bootstrap section of the result document: runs the hierarchical bootstrap on the design
 * and reports each condition and each given contrast in the result's field names. Contrasts are
 * named by condition label (a − b), as the mixed-model contrasts are, so the bootstrap is
 * oriented like them; without a condition the one group is called "all". The analysis engine
 * (analyzeNested) calls it; it is kept apart so its reporting can be tested on small designs.
 *
 * Guard errors: those of hierarchicalBootstrap (fewer than 100 resamples, a confidence outside
 * (0, 1), …); a contrast label the design does not have is an invalid pair there.
 *
 * @example
 * bootstrapForResult(design, [{ a: 'NW-117', b: 'vehicle' }], { resamples: 1000, seed: 'run-3', confidence: 0.95 })
 * // → { resamples: 1000, seed: 'run-3', confidence: 0.95, groups: [{ condition: 'vehicle', estimate: 41.2, … }, …],
 * //     contrasts: [{ a: 'NW-117', b: 'vehicle', estimate: 3.1, ciLow: -2.0, ciHigh: 8.3, p: 0.23, … }], … }
 */
export function bootstrapForResult(
  design: BootstrapInput,
  contrasts: { a: string; b: string }[],
  settings: { resamples: number; seed: string; confidence: number },
): BootstrapResult {
  const labels = design.condition?.labels ?? ['all']
  const boot = hierarchicalBootstrap(design, {
    resamples: settings.resamples,
    seed: settings.seed,
    confidence: settings.confidence,
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

/** The bootstrap section when the settings ask for one (null otherwise), resampling the design's units. */
export function bootstrapIfAsked(
  design: NestedDesign,
  contrasts: { a: string; b: string }[],
  options: Pick<AnalyzeNestedOptions, 'bootstrap' | 'beforeBootstrap'>,
  confidence: number,
): BootstrapResult | null {
  if (!options.bootstrap) return null
  options.beforeBootstrap?.()
  const condition =
    design.factors.length > 0 ? { labels: design.cells.labels, codes: design.cells.codes } : null
  return bootstrapForResult({ y: design.y, randomLevels: design.randomLevels, condition }, contrasts, {
    ...options.bootstrap,
    confidence,
  })
}
