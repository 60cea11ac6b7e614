import type { AnalysisResult } from '../../shared/schemas/analysis-result'
import { analyzeNested } from '../../shared/analysis/analyze-nested'
import type { AnalyzeArgs } from './analyze-args'
import { readColumnsFromFile } from './read-columns'

/** Reads the file named in the arguments and analyses it. */
export async function runAnalyze(args: AnalyzeArgs): Promise<AnalysisResult> {
  const columns = await readColumnsFromFile(args.file, {
    response: args.response,
    levels: args.levels,
    conditions: args.conditions,
    covariates: args.covariates,
    family: args.family,
    trials: args.trials,
    positive: args.positive,
    delimiter: args.delimiter,
    decimal: args.decimal,
  })
  const { outcome, ...engineColumns } = columns
  const result = analyzeNested(engineColumns, { reference: args.reference, bootstrap: args.bootstrap })
  // Which of the response's two values was counted as yes, so the JSON says so.
  if (outcome) result.outcome = outcome
  return result
}
