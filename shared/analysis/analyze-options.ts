/** What a caller can ask of analyzeNested (and of analyzeNestedGlmm through it). */
export interface AnalyzeNestedOptions {
  /** Reference level per condition column; a column left out uses its first label. */
  reference?: Record<string, string>
  /** Adds a seeded hierarchical bootstrap (at least 100 resamples). */
  bootstrap?: { resamples: number; seed: string } | null
  /** Called just before the bootstrap starts, so a caller can show it as a stage of its own. */
  beforeBootstrap?: () => void
}
