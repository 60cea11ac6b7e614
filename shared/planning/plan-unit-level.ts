import type { AnalysisResult } from '../schemas/analysis-result'

/**
 * The level whose units a plan from this result counts per lab and arm: the level that carries
 * the condition, or the next level inside it when that is the outermost level and each of its
 * units (labs) runs one arm; else the innermost level. "mouse" → "mice per arm". The same choice
 * as threeLevelComponents, without the variances.
 */
export function planUnitLevel(
  result: Pick<AnalysisResult, 'conditionLevel' | 'levels'> & Partial<Pick<AnalysisResult, 'factors'>>,
): string {
  const levels = result.levels
  const carrier = result.factors?.[0]?.level ?? result.conditionLevel
  if (carrier !== null && levels[0]?.name === carrier && levels.length >= 2) return levels[1].name
  return carrier ?? levels.at(-1)?.name ?? 'unit'
}
