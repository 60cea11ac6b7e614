import type { AnalysisResult } from '../../shared/schemas/analysis-result'
import type { AnalysisSettings } from '../../shared/schemas/analyses'
import { fileStem } from './file-stem'

/**
 * "Check it in R": a short script that refits one finished version with lme4 + lmerTest from the
 * exact rows it used (rRowsCsv), with the same formula (result.model.formula, or for engine 0.1
 * results the nested model it fitted), the same reference levels (R factor levels, reference
 * first) and covariates, and prints R's estimates beside the ones Nestwise stored.
 *
 * Source of the R side: Bates, Mächler, Bolker & Walker (2015), J Stat Softw 67(1) (lmer,
 * formula syntax); Kuznetsova, Brockhoff & Christensen (2017), J Stat Softw 82(13) (Satterthwaite
 * df in summary and anova). The optimiser tolerances are tightened beyond lme4's defaults, as in
 * the project's own reference check (tests/reference/lmer-reference.R), so that R's optimum is as
 * exact as the engine's and the two agree to about four significant digits.
 *
 * Binary and count responses (result.model.family) are refitted with glmer and that family, the
 * Laplace approximation as the engine, with the tolerances of tests/reference/glmer-reference.R;
 * their coefficients carry Wald z instead of Satterthwaite df.
 */

export interface RExportInput {
  analysisName: string
  versionNo: number
  result: AnalysisResult
  /** Name of the CSV file the script reads (rRowsFilename). */
  dataFile: string
  engineVersion: string
  datasetSha256: string
  columns: RExportColumns
}

/** The CSV's columns, in order: response, trials, levels (outer first), conditions, covariates. */
export interface RExportColumns {
  response: string
  /** Successes out of trials: the trials column (its values written beside the successes); else null. */
  trials: string | null
  levels: string[]
  conditions: string[]
  covariates: string[]
}

/** R's name for a column: plain when it is a syntactic R name, else in backticks (as modelFormula writes it). */
export function rName(name: string): string {
  return /^[A-Za-z.][A-Za-z0-9._]*$/.test(name) && !/^\.\d/.test(name)
    ? name
    : `\`${name.replace(/[`\\]/g, '\\$&')}\``
}

/** An R string literal. */
export function rString(text: string): string {
  return `"${text.replace(/[\\"]/g, '\\$&').replace(/\n/g, '\\n').replace(/\r/g, '\\r').replace(/\t/g, '\\t')}"`
}

const rVector = (items: readonly string[]) => `c(${items.join(', ')})`
/** Numbers in full precision (shortest round-trip form), as R reads them back exactly. */
const rNumber = (value: number) => (Number.isFinite(value) ? String(value) : 'NA')

/** The condition factors with their labels, reference first: engine ≥ 0.2 lists them; 0.1 had one. */
export function rFactors(result: AnalysisResult): { name: string; labels: string[] }[] {
  if (result.factors) return result.factors.map((f) => ({ name: f.name, labels: f.labels }))
  if (!result.condition) return []
  const others = result.groups.map((g) => g.condition).filter((c) => c !== result.reference)
  return [{ name: result.condition, labels: result.reference ? [result.reference, ...others] : others }]
}

/**
 * The model in lme4 notation: the engine's own formula when it stored one (engine ≥ 0.2); for an
 * engine 0.1 result, the model that engine fitted: the condition as the only fixed effect and a
 * random intercept per level, each unit named by its path (lab, lab:mouse).
 */
export function rFormula(result: AnalysisResult): string {
  if (result.model?.formula) return result.model.formula
  const names = result.levels.map((l) => l.name)
  const random = names.map(
    (_, d) =>
      `(1|${names
        .slice(0, d + 1)
        .map(rName)
        .join(':')})`,
  )
  const fixed = result.condition ? rName(result.condition) : '1'
  return `${rName(result.response)} ~ ${[fixed, ...random].join(' + ')}`
}

/** The columns the rows file carries: what the model used, from the result and the version's settings. */
export function rExportColumns(
  result: AnalysisResult,
  settings: Pick<AnalysisSettings, 'family' | 'trials'>,
): RExportColumns {
  return {
    response: result.response,
    trials: settings.family === 'binomial' ? settings.trials : null,
    levels: result.levels.map((l) => l.name),
    conditions: rFactors(result).map((f) => f.name),
    covariates: (result.covariates ?? []).map((c) => c.name),
  }
}

/**
 * lme4's name of each stored coefficient, in R's model.matrix order as the engine keeps it:
 * "(Intercept)", "treatmentNW-117", "soma_area_um2", "genotypeKO:treatmentNW-117".
 */
export function rCoefficientNames(result: AnalysisResult): string[] {
  const coefficients = result.comparisons.mixedModel?.coefficients ?? []
  return coefficients.map((c) => {
    if (c.term === '(intercept)') return '(Intercept)'
    if (c.level === null) return rName(c.term)
    const terms = c.term.split(':')
    const levels = c.level.split(':')
    return terms.map((t, i) => `${rName(t)}${levels[i] ?? ''}`).join(':')
  })
}

/**
 * lme4's group name of each stored variance component ("lab", "lab:treatment", "lab:mouse",
 * "Residual"): the grouping of the formula's random term, which names a nested unit by its path.
 */
export function rComponentGroups(result: AnalysisResult): string[] {
  const names = result.levels.map((l) => l.name)
  // The formula's random terms are in the order of model.random: "(1|lab:mouse)" → "lab:mouse".
  const groupings = [...rFormula(result).matchAll(/\(1\|([^)]+)\)/g)].map((m) =>
    m[1].replace(/`((?:[^`\\]|\\.)*)`/g, (_, inner: string) => inner.replace(/\\(.)/g, '$1')),
  )
  const random: { name: string; level?: string; factor?: string | null }[] =
    result.model?.random ?? names.map((name) => ({ name, level: name, factor: null }))
  // A component is named by its term ("lab:treatment") or, for a level's own term, by the level.
  const groupOf = (component: string) => {
    let i = random.findIndex((r) => r.name === component)
    if (i < 0) i = random.findIndex((r) => r.level === component && !r.factor)
    return i >= 0 ? (groupings[i] ?? component) : component
  }
  return result.varianceComponents.map((c) => (c.level === 'residual' ? 'Residual' : groupOf(c.level)))
}

export function rRowsFilename(analysisName: string, versionNo: number): string {
  return `${fileStem(analysisName)}-v${versionNo}-rows.csv`
}

export function rScriptFilename(analysisName: string, versionNo: number): string {
  return `${fileStem(analysisName)}-v${versionNo}.R`
}

/** A Gaussian response: REML with lmer, and lmerTest's Satterthwaite tests of the terms. */
function lmerFit(formula: string, nCoefficients: number): string[] {
  return [
    'control <- lmerControl(',
    '  optimizer = "nloptwrap",',
    '  optCtrl = list(xtol_abs = 1e-12, ftol_abs = 1e-14, xtol_rel = 1e-12, ftol_rel = 1e-15, maxeval = 1e5),',
    '  check.conv.singular = "ignore"',
    ')',
    `model <- lmer(${formula}, data = d, REML = TRUE, control = control)`,
    'print(summary(model))',
    ...(nCoefficients > 1 ? ['print(anova(model, type = 3, ddf = "Satterthwaite"))'] : []),
  ]
}

/** A binary or count response: glmer with the stored family (Laplace, as the engine). */
function glmerFit(formula: string, family: string): string[] {
  return [
    '# tolPwrss: glmer’s inner iterations stop at 1e-7 by default, a little short of the exact modes.',
    'control <- glmerControl(',
    '  optimizer = "bobyqa",',
    '  optCtrl = list(rhoend = 1e-10, maxfun = 1e5),',
    '  tolPwrss = 1e-13,',
    '  check.conv.singular = "ignore"',
    ')',
    `model <- glmer(${formula}, data = d, family = ${family}, control = control)`,
    'print(summary(model))',
  ]
}

/** The script itself. */
export function rScript(input: RExportInput): string {
  const { result, columns } = input
  const family = result.model?.family ?? null
  const factors = rFactors(result)
  const formula = rFormula(result)
  const coefficients = result.comparisons.mixedModel?.coefficients ?? []
  const coefficientNames = rCoefficientNames(result)
  // A binary or count model has no residual parameter: its "residual" is the latent-scale variance
  // the ICC is computed with (Nakagawa, Johnson & Schielzeth 2017), which glmer does not report.
  const components = result.varianceComponents
    .map((c, i) => ({ variance: c.variance, group: rComponentGroups(result)[i] }))
    .filter((c) => !family || c.group !== 'Residual')
  const col = (name: string) => `d[[${rString(name)}]]`
  const lines = [
    `# Nestwise: ${input.analysisName.replace(/[\r\n]+/g, ' ')}, version ${input.versionNo}`,
    `# Refits this version with ${family ? 'lme4’s glmer' : 'lme4 + lmerTest'} and prints R’s estimates beside the ones Nestwise stored.`,
    `# Rows: ${input.dataFile}, the ${result.nObs} rows the analysis used (the exclusions recorded with this`,
    '# version applied, rows without a response or covariate value left out). Keep both files in one folder',
    '# and run: Rscript this-file.R (or source() it with the folder as the working directory).',
    `# Engine ${input.engineVersion}; dataset checksum (SHA-256) ${input.datasetSha256}.`,
    '',
    'suppressPackageStartupMessages({',
    '  library(lme4)',
    ...(family ? [] : ['  library(lmerTest) # Satterthwaite df in summary() and anova()']),
    '})',
    '',
    `d <- read.csv(${rString(input.dataFile)}, colClasses = "character", check.names = FALSE, na.strings = "", encoding = "UTF-8")`,
    ...(result.outcome
      ? [
          `# The response as Nestwise read it: 1 = ${rString(result.outcome.positive)}, 0 = ${result.outcome.negative === null ? 'the other value' : rString(result.outcome.negative)}.`,
        ]
      : []),
    `${col(columns.response)} <- as.numeric(${col(columns.response)})`,
    ...(columns.trials ? [`${col(columns.trials)} <- as.numeric(${col(columns.trials)})`] : []),
    ...columns.covariates.map((c) => `${col(c)} <- as.numeric(${col(c)})`),
    '# Reference level first, as Nestwise coded it (treatment contrasts).',
    ...factors.map(
      (f) => `${col(f.name)} <- factor(${col(f.name)}, levels = ${rVector(f.labels.map(rString))})`,
    ),
    `stopifnot(nrow(d) == ${result.nObs})`,
    '',
    '# Tighter than lme4’s default tolerances, so that R’s optimum is as exact as Nestwise’s.',
    ...(family ? glmerFit(formula, family) : lmerFit(formula, coefficients.length)),
    '',
    '# What Nestwise stored for this version, beside what R finds.',
    'vc <- as.data.frame(VarCorr(model))',
    `nestwise_variances <- data.frame(group = ${rVector(components.map((c) => rString(c.group)))}, nestwise = ${rVector(components.map((c) => rNumber(c.variance)))})`,
    'nestwise_variances$r <- vc$vcov[match(nestwise_variances$group, vc$grp)]',
    'print(nestwise_variances, digits = 6)',
  ]
  if (coefficients.length) {
    lines.push(
      'coefs <- summary(model)$coefficients',
      `nestwise_fixed <- data.frame(term = ${rVector(coefficientNames.map(rString))}, estimate = ${rVector(coefficients.map((c) => rNumber(c.estimate)))}, se = ${rVector(coefficients.map((c) => rNumber(c.se)))}, ${family ? 'z' : 'df'} = ${rVector(coefficients.map((c) => rNumber('df' in c ? c.df : c.z)))})`,
      'nestwise_fixed$r_estimate <- coefs[nestwise_fixed$term, "Estimate"]',
      'nestwise_fixed$r_se <- coefs[nestwise_fixed$term, "Std. Error"]',
      family
        ? 'nestwise_fixed$r_z <- coefs[nestwise_fixed$term, "z value"]'
        : 'nestwise_fixed$r_df <- coefs[nestwise_fixed$term, "df"]',
      'print(nestwise_fixed, digits = 6)',
    )
  } else {
    lines.push(
      '# This version predates the stored coefficients (engine 0.1): compare the contrasts printed on its page',
      '# with the estimates above.',
    )
  }
  return lines.join('\n') + '\n'
}
