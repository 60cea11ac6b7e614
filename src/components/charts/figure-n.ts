import type { AnalysisResult } from '../../../shared/schemas/analysis-result'
import { formatCount } from '@/components/dataset/format'

/**
 * The n under an exported figure: the observations, and the units of the level that carries the
 * condition (else the innermost), with the outermost level's count when there are several levels:
 * "n = 1,341 observations in 24 units of “mouse”, 3 of “site”".
 */
export function figureN(result: Pick<AnalysisResult, 'nObs' | 'levels' | 'conditionLevel'>): string {
  const levels = result.levels
  if (!levels.length) return `n = ${formatCount(result.nObs)} observations`
  const unit = levels.find((l) => l.name === result.conditionLevel) ?? levels[levels.length - 1]
  const outer = levels[0] !== unit ? levels[0] : null
  return `n = ${formatCount(result.nObs)} observations in ${formatCount(unit.nUnits)} units of “${unit.name}”${
    outer ? `, ${formatCount(outer.nUnits)} of “${outer.name}”` : ''
  }`
}
