import type { AnalysisRunError } from '../../shared/schemas/analyses'
import { EngineInputError } from '../../shared/stats/engine-input-error'
import { AppError } from '../errors/app-error'

/**
 * What a failed run tells the person: the engine's own words when the data are too thin
 * (EngineInputError) or a row cannot be used (the read-back's 422), a plain sentence otherwise.
 * Internal details stay in the server log.
 */
export function classifyRunError(err: unknown): AnalysisRunError {
  if (err instanceof EngineInputError) {
    return {
      code: 'UNPROCESSABLE',
      message: err.message,
      ...(err.column ? { details: { column: err.column } } : {}),
    }
  }
  if (err instanceof AppError && err.status >= 400 && err.status < 500) {
    return {
      code: 'UNPROCESSABLE',
      message: err.message,
      ...(err.details === undefined ? {} : { details: err.details }),
    }
  }
  return {
    code: 'INTERNAL',
    message:
      'The analysis failed on the server. The error is in the server log; try again or ask the administrator.',
  }
}
