import type { AnalysisResult, ModelDescription } from '../schemas/analysis-result'
import { componentLabel, listWords, pluralOf, termLabel } from './words'

type ModelFacts = Pick<AnalysisResult, 'response' | 'factors' | 'covariates' | 'levels'> &
  Partial<Pick<AnalysisResult, 'family' | 'outcome'>> & {
    model: ModelDescription
  }

function fixedPart({ factors = [], covariates = [] }: ModelFacts): string {
  const names = factors.map((f) => f.name)
  const main = names.length === 2 ? `${names[0]}, ${names[1]} and their interaction` : names[0]
  const slopes = covariates.length
    ? `a straight-line slope in ${listWords(covariates.map((c) => c.name))}`
    : null
  if (main && slopes) return `depends on ${main}, plus ${slopes}`
  if (main || slopes) return `depends on ${main ?? slopes}`
  return 'has one overall mean'
}

function randomPart({ model, levels }: ModelFacts): string {
  const order = levels.map((l) => l.name)
  const between = model.random
    .filter((t) => t.factor === null)
    .map((t) => {
      const parent = order[order.indexOf(t.level) - 1]
      return `between ${pluralOf(t.level)}${parent ? ` within a ${parent}` : ''}`
    })
  const crossed = [...new Set(model.random.filter((t) => t.factor !== null).map((t) => t.level))].map(
    (level) => {
      const factors = model.random
        .filter((t) => t.level === level && t.factor !== null)
        .map((t) => termLabel(t.factor!))
      const many = factors.length > 1
      return `the effect${many ? 's' : ''} of ${listWords(factors)} differ${many ? '' : 's'} at random from one ${level} to the next`
    },
  )
  const parts = [between.length ? `it varies at random ${listWords(between)}` : null, ...crossed]
  const words = parts.filter((p): p is string => p !== null)
  // Whole clauses: a comma before the last "and" keeps them apart.
  const clauses = words.length > 1 ? `${words.slice(0, -1).join(', ')}, and ${words.at(-1)}` : words.join('')
  return clauses ? `; ${clauses}` : ''
}

/**
 * The fitted model in one plain sentence, beside its lme4 formula: "In words: “length” depends on
 * treatment; it varies at random between labs and between mice within a lab, and the effect of
 * treatment differs at random from one lab to the next."
 */
export function modelReading(facts: ModelFacts): string {
  return `In words: ${subject(facts)} ${fixedPart(facts)}${randomPart(facts)}.`
}

/** What the model describes: the response itself, or the log odds of yes, or the log of the mean count. */
function subject(facts: ModelFacts): string {
  if (facts.family === 'binomial') {
    const yes = facts.outcome ? ` (“${facts.outcome.positive}”)` : ''
    return `the log odds of yes${yes} in “${facts.response}”`
  }
  if (facts.family === 'poisson') return `the log of the mean count of “${facts.response}”`
  return `“${facts.response}”`
}

/** Why a level × condition term is not in the model, for the hover beside the formula. */
export function skippedExplain(
  skipped: ModelDescription['skipped'][number],
  model: ModelDescription,
): string {
  const name = componentLabel(skipped.name, model.random)
  const same =
    skipped.sameAs === 'residual' || skipped.sameAs === 'observations'
      ? 'the single observations'
      : `“${componentLabel(skipped.sameAs, model.random)}”`
  return `“${name}” is left out: its groups are exactly those of ${same}, so the data cannot tell the two apart.`
}
