/**
 * How the condition meets the outer level (lab, day, plate):
 * - 'every-arm': every lab runs every arm, units (animals) are assigned to arms within each lab
 *   (a multisite design);
 * - 'one-arm': each lab runs one arm (the condition is carried by the lab).
 */
export type LabDesign = 'every-arm' | 'one-arm'

export interface ThreeLevelVariances {
  /** σ²_lab×arm: how much a lab's mean in one arm departs from what the lab and the arm predict. */
  labArmVariance: number
  /** σ²_unit: between units (animals) of the same lab and arm. */
  unitVariance: number
  /** σ²_resid: between observations (cells) of the same unit. */
  residualVariance: number
  /** σ²_lab: between labs' overall means. Cancels in an every-arm design; used by 'one-arm' only (default 0). */
  labVariance?: number
}
