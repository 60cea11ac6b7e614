import { ApiError, toApiError } from './http'

export interface TransferProgress {
  loaded: number
  total: number
}

export interface UploadRequestOptions {
  /** Extra request headers (the upload token the server reports progress under). */
  headers?: Record<string, string>
  onTransfer?: (progress: TransferProgress) => void
  /** Called once the last byte has left the browser; the server is parsing from then on. */
  onSent?: () => void
  signal?: AbortSignal
}

/**
 * POSTs a multipart form with XMLHttpRequest, because fetch reports no upload progress.
 * Answers and errors follow http.ts: `{ data }` resolves, anything else rejects with an ApiError;
 * an abort rejects with a DOMException named AbortError, like fetch.
 */
export function postMultipart<T>(
  path: string,
  form: FormData,
  options: UploadRequestOptions = {},
): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    if (options.signal?.aborted) {
      reject(new DOMException('The upload was cancelled.', 'AbortError'))
      return
    }
    const xhr = new XMLHttpRequest()
    xhr.open('POST', path)
    xhr.setRequestHeader('Accept', 'application/json')
    xhr.setRequestHeader('X-Requested-With', 'nestwise')
    for (const [name, value] of Object.entries(options.headers ?? {})) xhr.setRequestHeader(name, value)

    xhr.upload.onprogress = (event) => {
      if (event.lengthComputable) options.onTransfer?.({ loaded: event.loaded, total: event.total })
    }
    xhr.upload.onload = () => options.onSent?.()

    const onAbort = () => xhr.abort()
    options.signal?.addEventListener('abort', onAbort, { once: true })
    const done = () => options.signal?.removeEventListener('abort', onAbort)

    xhr.onload = () => {
      done()
      void settle(xhr).then(resolve as (value: unknown) => void, reject)
    }
    xhr.onerror = () => {
      done()
      reject(
        new ApiError({
          status: 0,
          code: 'NETWORK',
          message: 'The upload was interrupted: the Nestwise server could not be reached. Try again.',
        }),
      )
    }
    xhr.onabort = () => {
      done()
      reject(new DOMException('The upload was cancelled.', 'AbortError'))
    }
    xhr.send(form)
  })
}

async function settle(xhr: XMLHttpRequest): Promise<unknown> {
  const headers = new Headers()
  const retryAfter = xhr.getResponseHeader('Retry-After')
  if (retryAfter) headers.set('Retry-After', retryAfter)
  // Response accepts no body for these statuses.
  const body = xhr.status === 204 || xhr.status === 205 ? null : xhr.responseText
  const response = new Response(body, { status: xhr.status, headers })
  if (response.ok) {
    if (!xhr.responseText) return undefined
    try {
      return (JSON.parse(xhr.responseText) as { data?: unknown }).data
    } catch {
      throw new ApiError({
        status: xhr.status,
        code: 'INTERNAL',
        message: 'The server answered in an unexpected format.',
      })
    }
  }
  throw await toApiError(response)
}
