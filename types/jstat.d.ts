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
    [name: string]: unknown
  }
  const jStat: JStatStatic
  export default jStat
}
