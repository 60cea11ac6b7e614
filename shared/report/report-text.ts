import type { AnalysisSettings } from '../schemas/analyses'
import type { AnalysisResult, MixedModelContrast } from '../schemas/analysis-result'
import { contrastInterval } from './contrast-interval'
import { formatDf, formatInterval, formatNumber, formatP } from './number-format'

/**
 * The "How to report this" text: a methods paragraph and a results sentence that count the
 * independent units (not the observations), name the model, the df method and the software.
 * Pure: the same result always gives the same words, so the text can be tested and reused.
 */

export interface ReportContext {
  result: AnalysisResult
  settings: AnalysisSettings
  /** Name and version of the program, e.g. "Nestwise 0.1.0". */
  software: string
}

export interface ReportText {
  methods: string
  results: string
}

function listWords(items: string[]): string {
  if (items.length <= 1) return items.join('')
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`
}

/** Units of the condition level per condition: "5 vehicle and 5 NW-117 mice"-style counts. */
function unitsPerCondition(result: AnalysisResult): string | null {
  if (!result.conditionLevel) return null
  const parts = result.groups.map((g) => `${g.nUnits ?? '?'} (${g.condition})`)
  return `n = ${parts.join(', ')} units of “${result.conditionLevel}”`
}

function levelsDescription(result: AnalysisResult): string {
  const levels = result.levels.map((l) => `“${l.name}” (${l.nUnits} units)`)
  return levels.length === 1
    ? `a random intercept for ${levels[0]}`
    : `random intercepts for ${listWords(levels)}, each nested in the one before`
}

export function methodsParagraph({ result, settings, software }: ReportContext): string {
  const sentences: string[] = []
  const subject = `“${result.response}”`
  if (result.condition) {
    const conditions = result.groups.map((g) => g.condition)
    sentences.push(
      `${subject} was compared between the conditions of “${result.condition}” (${listWords(conditions)}; reference ${result.reference}) with a linear mixed model fitted by REML, with ${levelsDescription(result)}.`,
    )
    sentences.push(
      result.groups.length > 2
        ? 'Degrees of freedom used the Satterthwaite approximation; the overall difference was tested with an F test and pairwise differences were Holm-adjusted.'
        : 'Degrees of freedom used the Satterthwaite approximation.',
    )
  } else {
    sentences.push(
      `The mean of ${subject} was estimated with a linear mixed model fitted by REML, with ${levelsDescription(result)}; degrees of freedom used the Satterthwaite approximation.`,
    )
  }
  const unitsTest = result.comparisons.unitMeans
  if (unitsTest) {
    const test = unitsTest.method === 'student-t' ? "Student's t-test" : 'one-way ANOVA'
    sentences.push(
      `As a check, a ${test} was run on the means of the ${unitsTest.nUnits} units of “${unitsTest.level}”.`,
    )
  }
  const boot = result.comparisons.bootstrap
  if (boot && settings.bootstrap.enabled) {
    sentences.push(
      `A hierarchical bootstrap (resampling units at every level, ${boot.resamples} resamples, seed “${boot.seed}”) gave percentile ${Math.round(boot.confidence * 100)}% intervals.`,
    )
  }
  const perCondition = unitsPerCondition(result)
  const outer = result.levels[0]
  sentences.push(
    perCondition
      ? `The independent unit is the “${result.conditionLevel}”: ${perCondition}, with ${result.nObs} observations in all (design effect ${formatNumber(result.designEffect)}, effective n ${formatNumber(result.effectiveN)}).`
      : `The ${result.nObs} observations came from ${outer.nUnits} units of “${outer.name}” (design effect ${formatNumber(result.designEffect)}, effective n ${formatNumber(result.effectiveN)}).`,
  )
  sentences.push(`Analyses were run in ${software} (statistics engine ${result.engine.version}).`)
  return sentences.join(' ')
}

function contrastSentence(c: MixedModelContrast, result: AnalysisResult, adjusted: boolean): string {
  const [low, high] = contrastInterval(c.estimate, c.se, c.df)
  const p = adjusted ? `${formatP(c.pHolm)}, Holm-adjusted` : formatP(c.p)
  const a = result.groups.find((g) => g.condition === c.a)
  const b = result.groups.find((g) => g.condition === c.b)
  const n =
    a?.nUnits != null && b?.nUnits != null && result.conditionLevel
      ? `; n = ${a.nUnits} vs ${b.nUnits} units of “${result.conditionLevel}”`
      : ''
  return `${c.a} minus ${c.b}: ${formatNumber(c.estimate)} (95% CI ${formatInterval(low, high)}; t(${formatDf(c.df)}) = ${formatNumber(c.t)}, ${p}${n})`
}

export function resultsSentence({ result }: ReportContext): string {
  const model = result.comparisons.mixedModel
  const tail = 'linear mixed model, Satterthwaite df'
  if (!model || model.contrasts.length === 0) {
    const g = result.groups[0]
    return `The mean of “${result.response}” was ${formatNumber(g.clustered.estimate)} (95% CI ${formatInterval(g.clustered.ciLow, g.clustered.ciHigh)}; SE ${formatNumber(g.clustered.se)}, df ${formatDf(g.clustered.df)}; ${result.levels[0].nUnits} units of “${result.levels[0].name}”, ${result.nObs} observations; ${tail}).`
  }
  if (model.omnibus) {
    const f = model.omnibus
    const pairs = model.contrasts.map((c) => contrastSentence(c, result, true))
    return `Across conditions of “${result.condition}”, F(${formatDf(f.df1)}, ${formatDf(f.df2)}) = ${formatNumber(f.f)}, ${formatP(f.p)} (${tail}). Pairwise: ${pairs.join('; ')}.`
  }
  return `Difference in “${result.response}”, ${contrastSentence(model.contrasts[0], result, false)}; ${tail}.`
}

export function reportText(context: ReportContext): ReportText {
  return { methods: methodsParagraph(context), results: resultsSentence(context) }
}
