import type { NestedDesign } from './types'

/**
 * The fitted model in lme4's formula notation, so it can be refitted elsewhere:
 * `response ~ A * B + x + (1|lab) + (1|lab:treatment) + (1|lab:animal)`. Nested units are named by
 * their path (`lab:animal`), which is what lme4 needs when labels repeat under different parents.
 * Names that are not plain R names are quoted in backticks. With a trials column (successes out
 * of trials) the response is written as glmer takes it: cbind(successes, trials − successes).
 *
 * Source: Bates, Mächler, Bolker & Walker (2015), J Stat Softw 67(1), §2.1 (formula syntax).
 *
 * Guard errors: none.
 *
 * @example
 * modelFormula(design) // → 'length ~ treatment + (1|lab) + (1|lab:treatment) + (1|lab:animal)'
 */
export function modelFormula(design: NestedDesign, trialsName?: string): string {
  const fixedParts: string[] = []
  if (design.factors.length > 0) fixedParts.push(design.factors.map((f) => rName(f.name)).join(' * '))
  for (const c of design.covariates) fixedParts.push(rName(c.name))
  const fixed = fixedParts.length > 0 ? fixedParts.join(' + ') : '1'
  const random = design.terms.map((t) => `(1|${t.grouping.map(rName).join(':')})`)
  const response = rName(design.responseName)
  const lhs = trialsName ? `cbind(${response}, ${rName(trialsName)} - ${response})` : response
  return `${lhs} ~ ${[fixed, ...random].join(' + ')}`
}

function rName(name: string): string {
  return /^[A-Za-z.][A-Za-z0-9._]*$/.test(name) && !/^\.\d/.test(name)
    ? name
    : `\`${name.replace(/[`\\]/g, '\\$&')}\``
}
