import type { AnalysisResult } from '../schemas/analysis-result'

/**
 * The level whose units a plan from this result counts per arm: the level that carries the
 * condition (its units were assigned to arms), else the innermost level. "mouse" → "mice per arm".
 */
export function planUnitLevel(result: Pick<AnalysisResult, 'conditionLevel' | 'levels'>): string {
  return result.conditionLevel ?? result.levels.at(-1)?.name ?? 'unit'
}
