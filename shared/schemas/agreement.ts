/**
 * Agreement between labs (the outermost level of an analysis): the shape the server computes and
 * the page reads. Server output only, so plain types (no request parsing needs a schema).
 * "Units" are the units of the level inside the lab (e.g. mice); their means are the lab's
 * independent results. Flags follow ISO 5725-2 wording: straggler beyond 5 %, outlier beyond 1 %.
 */

export type AgreementFlag = 'ok' | 'straggler' | 'outlier'

export interface Critical {
  fivePercent: number
  onePercent: number
}

export interface AgreementInterval {
  mean: number
  /** t interval on the unit means (df = units − 1); null with fewer than two units. */
  ciLow: number | null
  ciHigh: number | null
  nUnits: number
  nObs: number
}

export interface AgreementLab {
  label: string
  nUnits: number
  nObs: number
  /** Mean of the lab's condition means (each the mean of its unit means): the lab's level. */
  level: number
  byCondition: ({ condition: string } & AgreementInterval)[]
  /** SD of unit means around the lab's condition means, with its df. */
  sdBetweenUnits: number | null
  dfBetweenUnits: number
  /** Pooled SD of observations around their unit's mean, with its df. */
  sdWithinUnits: number | null
  dfWithinUnits: number
  h: number
  hFlag: AgreementFlag
  kBetweenUnits: number | null
  kBetweenFlag: AgreementFlag | null
  kWithinUnits: number | null
  kWithinFlag: AgreementFlag | null
}

export interface AgreementTest {
  name: string
  statistic: number
  critical: Critical
  flag: AgreementFlag
  /** The lab the test points at. */
  lab: string
  /** One plain sentence. */
  sentence: string
}

export interface LabEffect {
  lab: string
  /** condition − reference, from the lab's unit means. */
  estimate: number
  se: number
  df: number
  ciLow: number
  ciHigh: number
  nUnits: number
}

export interface AgreementResult {
  analysisId: number
  versionNo: number
  labLevel: string
  unitLevel: string
  response: string
  condition: string | null
  labs: AgreementLab[]
  precision: {
    /** Repeatability SD: spread of unit means inside a lab. */
    sr: number
    sL: number
    sR: number
    r: number
    R: number
    sLTruncated: boolean
    grandMean: number
  }
  mandel: { h: Critical; kBetweenUnits: Critical | null; kWithinUnits: Critical | null }
  tests: AgreementTest[]
  effect: {
    condition: string
    reference: string
    perLab: LabEffect[]
    /** Lab × condition interaction F on unit means; null when units carry both conditions. */
    interaction: { f: number; df1: number; df2: number; p: number; sentence: string } | null
    note: string | null
  } | null
  /** Plain-language summary sentences, most important first. */
  findings: string[]
  notes: string[]
}
