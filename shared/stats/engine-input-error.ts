/**
 * Thrown when the data handed to the engine are too thin or malformed to analyse (a missing
 * column, fewer than two units, no usable rows). Callers map it to "input problem" (HTTP 422,
 * command-line exit code 2) rather than to an internal failure.
 *
 * @example
 * throw new EngineInputError('The level "animal" has only 1 unit; at least 2 are needed.', 'animal')
 */
export class EngineInputError extends Error {
  /** The column the problem is about, when there is one. */
  readonly column: string | null

  constructor(message: string, column: string | null = null) {
    super(message)
    this.name = 'EngineInputError'
    this.column = column
  }
}
