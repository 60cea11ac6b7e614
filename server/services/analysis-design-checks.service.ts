import type { AnalysisSettings } from '../../shared/schemas/analyses'
import type { Exclusion } from '../../shared/schemas/datasets'
import { InvalidPayloadError, UnprocessableError } from '../errors/app-error'
import {
  crossedLabelCounts,
  excludedSql,
  factorsAcrossLevels,
  firstNonNumberRow,
  type RowTableShape,
} from '../rows-store/row-queries'
import { checkResponseForFamily } from './analysis-response-checks.service'
import type { VersionRecord } from '../repositories/datasets.repo'
import type { Conn } from '../repositories/connection'
import { fileRow } from '../rows-store/read-back'

const q = (name: string) => `“${name}”`

type AppliedExclusions = readonly Pick<Exclusion, 'kind' | 'rule' | 'unit'>[]

/**
 * Checks settings against the kept rows of a dataset version, where the profile cannot tell:
 * - a covariate holds numbers in every kept row (400 naming the column and the first file row
 *   that holds text, as the row table shows it);
 * - with two condition factors, neither is constant, they are not fully confounded (each label
 *   of one going with exactly one label of the other, both ways), and neither just renames the
 *   units of a nesting level (each unit a label of its own): 422 naming the columns (a single
 *   condition was checked against the levels when it was tagged; the engine refuses the rest);
 * - a binary or count response holds what its family can take (400 naming the first offending
 *   row, see checkResponseForFamily).
 * One query per text covariate, two scans for two factors and one or two for a binary or count
 * response; nothing for the usual normal one-factor case.
 *
 * @returns the settings to store: as given, with the value counted as yes of a yes/no response
 *   decided from the kept rows when none was named.
 */
export async function checkSettingsAgainstRows(
  version: VersionRecord,
  shape: RowTableShape,
  settings: AnalysisSettings,
  exclusions: AppliedExclusions,
  conn: Conn,
): Promise<AnalysisSettings> {
  const excluded = excludedSql(shape, exclusions)
  await checkCovariatesHoldNumbers(version, shape, settings.covariates, excluded, conn)
  if (settings.conditions.length === 2) {
    await checkFactorsCanBeToldApart(shape, settings.conditions, excluded, conn)
    await checkFactorsAreNotLevels(shape, settings.conditions, settings.levels, excluded, conn)
  }
  return checkResponseForFamily(version, shape, settings, excluded, conn)
}

async function checkCovariatesHoldNumbers(
  version: VersionRecord,
  shape: RowTableShape,
  covariates: readonly string[],
  excluded: string,
  conn: Conn,
): Promise<void> {
  for (const [i, name] of covariates.entries()) {
    const column = shape.columns.get(name)
    // Profiled as numbers means every cell is a number or missing; only text columns need a look.
    if (!column || column.type !== 'text') continue
    const offending = await firstNonNumberRow(shape, column.position, excluded, conn)
    if (!offending) continue
    const row = fileRow(version, offending.rowNo)
    const message = `${q(name)} cannot be a covariate: row ${row} holds ${q(offending.value)}, which is not a number. Correct the file, or exclude such rows first.`
    throw new InvalidPayloadError(message, {
      issues: [{ path: `settings.covariates.${i}`, message }],
      column: name,
      row,
    })
  }
}

async function checkFactorsCanBeToldApart(
  shape: RowTableShape,
  [first, second]: readonly string[],
  excluded: string,
  conn: Conn,
): Promise<void> {
  const a = shape.columns.get(first)
  const b = shape.columns.get(second)
  if (!a || !b) return
  const counts = await crossedLabelCounts(shape, a.position, b.position, excluded, conn)
  for (const [name, distinct, example] of [
    [second, counts.second, counts.secondExample],
    [first, counts.first, counts.firstExample],
  ] as const) {
    if (distinct < 2) {
      const value = example === null ? 'no value' : `a single value (${q(example)})`
      throw new UnprocessableError(
        `The condition ${q(name)} has ${value} in the rows kept: it cannot be a factor of the comparison. Leave it out of the conditions.`,
        { column: name, columns: [name] },
      )
    }
  }
  if (counts.pairs === counts.firstPaired && counts.pairs === counts.secondPaired) {
    throw new UnprocessableError(
      `The conditions ${q(first)} and ${q(second)} are fully confounded in the rows kept: each value of one goes with exactly one value of the other, so their effects cannot be told apart. Keep one of them.`,
      { columns: [first, second] },
    )
  }
}

/**
 * The outermost level within whose units a factor never changes carries it; when there are as
 * many labels as units of that level, the factor's effect and that level's variance are one and
 * the same (the engine refuses such a design too, see checkNotALevel).
 */
async function checkFactorsAreNotLevels(
  shape: RowTableShape,
  conditions: readonly string[],
  levels: readonly string[],
  excluded: string,
  conn: Conn,
): Promise<void> {
  const factors = conditions.map((name) => shape.columns.get(name)?.position)
  const positions = levels.map((name) => shape.columns.get(name)?.position)
  if ([...factors, ...positions].some((p) => p === undefined)) return
  const all = await factorsAcrossLevels(shape, positions as number[], factors as number[], excluded, conn)
  for (const [i, counts] of all.entries()) {
    const carrier = counts.units.findIndex((units, d) => units === counts.unitsByFactor[d])
    if (carrier < 0 || counts.units[carrier] !== counts.labels) continue
    const [condition, level] = [conditions[i], levels[carrier]]
    throw new UnprocessableError(
      `The condition ${q(condition)} groups the kept rows exactly as the level ${q(level)} does (each ${level} has a value of ${q(condition)} of its own), so its effect cannot be told apart from ${level}-to-${level} differences. Leave it out of the conditions, or choose the nesting levels again.`,
      { column: condition, columns: [condition, level] },
    )
  }
}
