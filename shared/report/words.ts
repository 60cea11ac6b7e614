import type { RandomTerm } from '../schemas/analysis-result'

/**
 * Plain words for the parts of a result, shared by the result page and the report text so both
 * say the same thing.
 */

const IRREGULAR: Record<string, string> = { mouse: 'mice', child: 'children', person: 'people' }

/** Plural of a level name for running text: "lab" → "labs", "mouse" → "mice", "batch" → "batches". */
export function pluralOf(word: string): string {
  const irregular = IRREGULAR[word.toLowerCase()]
  if (irregular)
    return word[0] === word[0].toUpperCase() ? irregular[0].toUpperCase() + irregular.slice(1) : irregular
  if (/(s|x|z|ch|sh)$/i.test(word)) return `${word}es`
  if (/[^aeiou]y$/i.test(word)) return `${word.slice(0, -1)}ies`
  return `${word}s`
}

/** "a", "a and b", "a, b and c". */
export function listWords(items: readonly string[]): string {
  if (items.length <= 1) return items.join('')
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`
}

/** A fixed term or interaction as read aloud: "genotype:treatment" → "genotype × treatment". */
export function termLabel(term: string): string {
  if (term === '(intercept)') return 'intercept'
  return term.split(':').join(' × ')
}

/** A factor or a combination of factors in running text: "treatment", "genotype and treatment together". */
export function factorWords(factor: string): string {
  const parts = factor.split(':')
  return parts.length > 1 ? `${listWords(parts)} together` : factor
}

/**
 * A variance component or random term as a plain label: "residual" is the spread within units,
 * "lab:treatment" (a level × condition term) reads "lab × treatment". When the model's random
 * terms are known, their own level and factor are used, so a column name holding ":" stays whole.
 */
export function componentLabel(name: string, random: readonly RandomTerm[] = []): string {
  if (name === 'residual') return 'within units (residual)'
  const term = random.find((r) => r.name === name || (r.factor === null && r.level === name))
  if (term) return term.factor === null ? term.level : `${term.level} × ${termLabel(term.factor)}`
  return termLabel(name)
}
