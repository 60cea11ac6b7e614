/**
 * Errors the API answers on purpose. Each has a stable SCREAMING_SNAKE code the client can switch on;
 * the message is written for the person using the app.
 */
export type ErrorCode =
  | 'INVALID_PAYLOAD'
  | 'UNAUTHENTICATED'
  | 'FORBIDDEN'
  | 'NOT_FOUND'
  | 'CONFLICT'
  | 'PAYLOAD_TOO_LARGE'
  | 'UNPROCESSABLE'
  | 'RATE_LIMITED'
  | 'MISDIRECTED_REQUEST'
  | 'SERVICE_UNAVAILABLE'
  | 'INTERNAL'

export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly code: ErrorCode,
    message: string,
    readonly details?: unknown,
  ) {
    super(message)
    this.name = new.target.name
  }
}

export class InvalidPayloadError extends AppError {
  constructor(message = 'The request is not valid.', details?: unknown) {
    super(400, 'INVALID_PAYLOAD', message, details)
  }
}

export class UnauthenticatedError extends AppError {
  constructor(message = 'Sign in to continue.') {
    super(401, 'UNAUTHENTICATED', message)
  }
}

export class ForbiddenError extends AppError {
  constructor(message = 'You do not have permission to do this.', details?: unknown) {
    super(403, 'FORBIDDEN', message, details)
  }
}

export class NotFoundError extends AppError {
  constructor(message = 'Not found.', details?: unknown) {
    super(404, 'NOT_FOUND', message, details)
  }
}

export class ConflictError extends AppError {
  constructor(message = 'This conflicts with existing data.', details?: unknown) {
    super(409, 'CONFLICT', message, details)
  }
}

export class PayloadTooLargeError extends AppError {
  constructor(message = 'The upload is too large.', details?: unknown) {
    super(413, 'PAYLOAD_TOO_LARGE', message, details)
  }
}

/** The input is well-formed but too thin for the requested analysis (for example a single cluster). */
export class UnprocessableError extends AppError {
  constructor(message: string, details?: unknown) {
    super(422, 'UNPROCESSABLE', message, details)
  }
}

export class RateLimitedError extends AppError {
  constructor(message = 'Too many attempts. Try again later.', details?: unknown) {
    super(429, 'RATE_LIMITED', message, details)
  }
}

/** The request names a host this server does not answer for (see middleware/allowed-hosts). */
export class MisdirectedRequestError extends AppError {
  constructor(message: string, details?: unknown) {
    super(421, 'MISDIRECTED_REQUEST', message, details)
  }
}

/** A service the request needs (the database) cannot be reached; the client may try again after `retryAfterSeconds`. */
export class ServiceUnavailableError extends AppError {
  constructor(
    message: string,
    readonly retryAfterSeconds: number,
    details?: unknown,
  ) {
    super(503, 'SERVICE_UNAVAILABLE', message, details)
  }
}

export class InternalError extends AppError {
  constructor(message = 'Something went wrong on the server.', details?: unknown) {
    super(500, 'INTERNAL', message, details)
  }
}
