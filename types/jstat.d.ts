// jstat ships CommonJS without types; declare only what the engine uses.
declare module 'jstat' {
  interface ContinuousDistribution {
    pdf(x: number, ...params: number[]): number
    cdf(x: number, ...params: number[]): number
    inv(p: number, ...params: number[]): number
  }
  interface JStatStatic {
    normal: ContinuousDistribution
    studentt: ContinuousDistribution
    centralF: ContinuousDistribution
    chisquare: ContinuousDistribution
    noncentralt: ContinuousDistribution
    beta: ContinuousDistribution
    /** Regularised incomplete beta function I_x(a, b). */
    ibeta(x: number, a: number, b: number): number
    [name: string]: unknown
  }
  const jStat: JStatStatic
  export default jStat
}
