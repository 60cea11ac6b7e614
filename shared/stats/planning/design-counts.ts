import type { LabDesign } from '../three-level-variance'
import type { PlanSearchResult } from './plan-search-result'

/**
 * How much a chosen design takes: labs (every lab runs every arm, or each arm its own labs), units
 * and observations, as both design searches report them.
 */
export function designCounts(
  design: LabDesign,
  arms: number,
  chosen: { labs: number; k: number; m: number },
): Pick<
  PlanSearchResult,
  'labs' | 'unitsPerLabArm' | 'obsPerUnit' | 'arms' | 'totalLabs' | 'totalUnits' | 'totalObs'
> {
  const labsBought = design === 'every-arm' ? 1 : arms
  return {
    labs: chosen.labs,
    unitsPerLabArm: chosen.k,
    obsPerUnit: chosen.m,
    arms,
    totalLabs: labsBought * chosen.labs,
    totalUnits: arms * chosen.labs * chosen.k,
    totalObs: arms * chosen.labs * chosen.k * chosen.m,
  }
}
