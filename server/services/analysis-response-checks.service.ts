import { defaultPositiveLabel } from '../../shared/analysis/binary-response'
import type { AnalysisSettings } from '../../shared/schemas/analyses'
import { InvalidPayloadError } from '../errors/app-error'
import { parseNumberText } from '../rows-store/number-text'
import { activeExclusions } from '../repositories/datasets-annotations.repo'
import {
  excludedSql,
  firstRowNotWholeNumber,
  firstRowsOfDistinctValues,
  firstRowSuccessesAboveTrials,
  type RowTableShape,
} from '../rows-store/row-queries'
import type { Conn } from '../repositories/connection'
import type { VersionRecord } from '../repositories/datasets.repo'
import { fileRow } from '../rows-store/read-back'

const q = (name: string) => `“${name}”`

/**
 * Checks that the kept rows hold a response the family can take, before a version is stored, so
 * a bad value is a 400 naming the file row (as the row table shows it) and never a failed run:
 * - binomial, one yes/no per row: at most two distinct values (two labels, or 0 and 1); the
 *   value named as yes is one of them. When none is named, it is decided here
 *   (defaultPositiveLabel) and returned, so the stored settings say which value was yes;
 * - binomial, successes out of trials: trials whole numbers ≥ 1, successes whole numbers ≥ 0 and
 *   not above the trials;
 * - poisson: whole numbers ≥ 0.
 * A normal response is left to the read-back, as before. Missing cells are not checked: the engine
 * leaves such rows out and counts them.
 */
export async function checkResponseForFamily(
  version: VersionRecord,
  shape: RowTableShape,
  settings: AnalysisSettings,
  excluded: string,
  conn: Conn,
): Promise<AnalysisSettings> {
  const response = shape.columns.get(settings.response)
  if (!response || settings.family === 'gaussian') return settings
  const row = (rowNo: number) => fileRow(version, rowNo)

  if (settings.family === 'poisson') {
    const bad = await firstRowNotWholeNumber(shape, response.position, 0, excluded, conn)
    if (bad)
      refuse(
        'settings.response',
        settings.response,
        row(bad.rowNo),
        `${q(settings.response)} cannot be a count response: row ${row(bad.rowNo)} holds ${q(bad.values[0])}, which is not a whole number of at least 0. Correct the file, or exclude such rows first.`,
      )
    return settings
  }

  if (settings.trials !== null) {
    const trials = shape.columns.get(settings.trials)
    if (!trials) return settings
    const badTrials = await firstRowNotWholeNumber(shape, trials.position, 1, excluded, conn)
    if (badTrials)
      refuse(
        'settings.trials',
        settings.trials,
        row(badTrials.rowNo),
        `Row ${row(badTrials.rowNo)} of ${q(settings.trials)} holds ${q(badTrials.values[0])}: trials must be whole numbers of at least 1. Correct the file, or exclude such rows first.`,
      )
    const badSuccesses = await firstRowNotWholeNumber(shape, response.position, 0, excluded, conn)
    if (badSuccesses)
      refuse(
        'settings.response',
        settings.response,
        row(badSuccesses.rowNo),
        `Row ${row(badSuccesses.rowNo)} of ${q(settings.response)} holds ${q(badSuccesses.values[0])}: successes must be whole numbers of at least 0. Correct the file, or exclude such rows first.`,
      )
    const above = await firstRowSuccessesAboveTrials(
      shape,
      response.position,
      trials.position,
      excluded,
      conn,
    )
    if (above)
      refuse(
        'settings.response',
        settings.response,
        row(above.rowNo),
        `Row ${row(above.rowNo)} has ${above.values[0]} successes in ${q(settings.response)} but only ${above.values[1]} trials in ${q(settings.trials)}: successes cannot exceed the trials.`,
      )
    return settings
  }

  const firsts = await firstRowsOfDistinctValues(shape, response, excluded, 3, conn)
  if (firsts.length > 2) {
    const [a, b, third] = firsts
    refuse(
      'settings.response',
      settings.response,
      row(third.rowNo),
      `${q(settings.response)} cannot be a yes/no response: row ${row(third.rowNo)} holds ${q(third.value)}, a third value besides ${q(a.value)} and ${q(b.value)}. Exclude such rows, or correct the file.`,
    )
  }
  const values = firsts.map((f) => f.value)
  const toNumber = (text: string) => parseNumberText(text, version.decimalMark)
  const same = (a: string, b: string) =>
    a === b || (Number.isFinite(toNumber(a)) && toNumber(a) === toNumber(b))
  if (settings.positive !== null) {
    if (values.length === 2 && !values.some((v) => same(v, settings.positive!))) {
      const message = `${q(settings.positive)} is not a value of ${q(settings.response)} (it has ${q(values[0])} and ${q(values[1])}).`
      throw new InvalidPayloadError(message, {
        issues: [{ path: 'settings.positive', message }],
        column: settings.response,
      })
    }
    return settings
  }
  if (values.length === 0) return settings
  return { ...settings, positive: defaultPositiveLabel(values, toNumber) }
}

/**
 * The two values a text column holds in the kept rows when they are labels (yes/no), else null.
 * For a response whose file holds a third value only in excluded rows: its profile (all rows)
 * shows three, but the tagging accepted it as yes/no. Numbers are not labels: a numbers column
 * whose stray text is excluded stays a measurement.
 */
export async function keptYesNoValues(
  version: VersionRecord,
  shape: RowTableShape,
  name: string,
): Promise<string[] | null> {
  const column = shape.columns.get(name)
  if (!column) return null
  const excluded = excludedSql(shape, await activeExclusions(version.id))
  const values = (await firstRowsOfDistinctValues(shape, column, excluded, 3)).map((f) => f.value)
  const isNumber = (text: string) => Number.isFinite(parseNumberText(text, version.decimalMark))
  return values.length === 2 && !values.some(isNumber) ? values : null
}

function refuse(path: string, column: string, row: number, message: string): never {
  throw new InvalidPayloadError(message, { issues: [{ path, message }], column, row })
}
