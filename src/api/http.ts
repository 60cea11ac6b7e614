/**
 * The one way the client talks to the API: same-origin cookies, JSON bodies, and the
 * `X-Requested-With: nestwise` header the server requires on writes (CSRF defence).
 * Every non-2xx answer and every network failure becomes an ApiError, so views only
 * ever handle one error type.
 */

export interface ApiErrorShape {
  status: number
  code: string
  message: string
  details?: unknown
  /** Seconds the server asked us to wait (Retry-After), when it said so. */
  retryAfterSeconds?: number
}

export class ApiError extends Error implements ApiErrorShape {
  readonly status: number
  readonly code: string
  readonly details?: unknown
  readonly retryAfterSeconds?: number

  constructor(shape: ApiErrorShape) {
    super(shape.message)
    this.name = 'ApiError'
    this.status = shape.status
    this.code = shape.code
    this.details = shape.details
    this.retryAfterSeconds = shape.retryAfterSeconds
  }
}

/**
 * Whether trying the same request again can help: no answer at all (status 0), a timeout, too
 * many requests, a conflict with something still running, or a server-side failure. A 4xx that
 * says the request itself is wrong (400, 403, 404, 422) answers the same every time.
 */
export function isRetryable(error: Pick<ApiError, 'status'>): boolean {
  return (
    error.status === 0 ||
    error.status === 408 ||
    error.status === 409 ||
    error.status === 429 ||
    error.status >= 500
  )
}

/** Used when the server's answer is not our JSON error shape (proxy pages, crashes). */
const fallbackByStatus: Record<number, { code: string; message: string }> = {
  400: { code: 'INVALID_PAYLOAD', message: 'The server did not accept this request.' },
  401: { code: 'UNAUTHENTICATED', message: 'You are not signed in.' },
  403: { code: 'FORBIDDEN', message: 'Your role does not allow this.' },
  404: { code: 'NOT_FOUND', message: 'This was not found.' },
  409: { code: 'CONFLICT', message: 'This conflicts with something that already exists.' },
  413: { code: 'PAYLOAD_TOO_LARGE', message: 'This upload is larger than the server accepts.' },
  422: { code: 'UNPROCESSABLE', message: 'The data is too thin for this calculation.' },
  429: { code: 'RATE_LIMITED', message: 'Too many attempts. Wait a little and try again.' },
  503: {
    code: 'SERVICE_UNAVAILABLE',
    message: 'The server cannot answer just now. Try again in a few seconds.',
  },
}

type UnauthenticatedHandler = (error: ApiError) => void
let onUnauthenticated: UnauthenticatedHandler | null = null

/**
 * Lets the app react once, centrally, when a session has expired mid-use
 * (clear the user, go to sign-in) instead of every view handling 401 itself.
 */
export function setUnauthenticatedHandler(handler: UnauthenticatedHandler | null): void {
  onUnauthenticated = handler
}

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE'
  body?: unknown
  signal?: AbortSignal
  /** Sign-in and the session probe expect 401 as a normal answer; they opt out of the handler. */
  skipUnauthenticatedHandler?: boolean
}

export async function request<T>(path: string, options: RequestOptions = {}): Promise<T> {
  const headers: Record<string, string> = {
    Accept: 'application/json',
    'X-Requested-With': 'nestwise',
  }
  const init: RequestInit = {
    method: options.method ?? 'GET',
    credentials: 'same-origin',
    headers,
    signal: options.signal,
  }
  if (options.body !== undefined) {
    headers['Content-Type'] = 'application/json'
    init.body = JSON.stringify(options.body)
  }

  let response: Response
  try {
    response = await fetch(path, init)
  } catch (cause) {
    if (cause instanceof DOMException && cause.name === 'AbortError') throw cause
    throw new ApiError({
      status: 0,
      code: 'NETWORK',
      message: 'Could not reach the Nestwise server. Check your connection and try again.',
    })
  }

  if (response.ok) {
    if (response.status === 204) return undefined as T
    const body = (await readJson(response)) as { data?: T } | undefined
    return body?.data as T
  }

  const error = await toApiError(response)
  if (error.status === 401 && !options.skipUnauthenticatedHandler) onUnauthenticated?.(error)
  throw error
}

async function readJson(response: Response): Promise<unknown> {
  const text = await response.text()
  if (!text) return undefined
  try {
    return JSON.parse(text)
  } catch {
    return undefined
  }
}

export async function toApiError(response: Response): Promise<ApiError> {
  const body = (await readJson(response)) as
    { error?: { code?: unknown; message?: unknown; details?: unknown } } | undefined
  const fallback = fallbackByStatus[response.status] ?? {
    code: 'INTERNAL',
    message: `The server ran into a problem (HTTP ${response.status}). Try again shortly.`,
  }
  const retryAfter = Number(response.headers.get('Retry-After'))
  return new ApiError({
    status: response.status,
    code: typeof body?.error?.code === 'string' ? body.error.code : fallback.code,
    message:
      typeof body?.error?.message === 'string' && body.error.message ? body.error.message : fallback.message,
    details: body?.error?.details,
    retryAfterSeconds: Number.isFinite(retryAfter) && retryAfter > 0 ? retryAfter : undefined,
  })
}

/** Lets stores keep any thrown value as an ApiError, even programming errors. */
export function asApiError(error: unknown): ApiError {
  if (error instanceof ApiError) return error
  return new ApiError({
    status: 0,
    code: 'CLIENT',
    message: error instanceof Error ? error.message : 'Something went wrong in the page.',
  })
}
