type Handler = ((event: ProgressEvent) => void) | null

// Plain objects: Node has no ProgressEvent, and the code under test reads only these fields.
const event = (type: string, fields: Partial<ProgressEvent> = {}) => ({ type, ...fields }) as ProgressEvent

/**
 * A scripted XMLHttpRequest for upload tests: the test drives upload progress and the answer.
 * Install with `vi.stubGlobal('XMLHttpRequest', FakeXhr)`; each instance lands in FakeXhr.sent.
 */
export class FakeXhr {
  static sent: FakeXhr[] = []

  method = ''
  url = ''
  headers: Record<string, string> = {}
  body: unknown = null
  status = 0
  responseText = ''
  private responseHeaders: Record<string, string> = {}
  upload: { onprogress: Handler; onload: Handler } = { onprogress: null, onload: null }
  onload: Handler = null
  onerror: Handler = null
  onabort: Handler = null

  open(method: string, url: string): void {
    this.method = method
    this.url = url
  }

  setRequestHeader(name: string, value: string): void {
    this.headers[name] = value
  }

  getResponseHeader(name: string): string | null {
    return this.responseHeaders[name.toLowerCase()] ?? null
  }

  send(body: unknown): void {
    this.body = body
    FakeXhr.sent.push(this)
  }

  abort(): void {
    this.onabort?.(event('abort'))
  }

  // ---- driven by the test

  progress(loaded: number, total: number): void {
    this.upload.onprogress?.(event('progress', { lengthComputable: true, loaded, total }))
  }

  finishUpload(): void {
    this.upload.onload?.(event('load'))
  }

  respond(status: number, body: unknown, headers: Record<string, string> = {}): void {
    this.status = status
    this.responseText = body === undefined ? '' : JSON.stringify(body)
    this.responseHeaders = Object.fromEntries(Object.entries(headers).map(([k, v]) => [k.toLowerCase(), v]))
    this.onload?.(event('load'))
  }

  failNetwork(): void {
    this.onerror?.(event('error'))
  }
}

/** Lets pending promise callbacks run (the XHR answer is parsed asynchronously). */
/** Fires the load event without an answer body (for non-JSON answers set status/responseText first). */
export function loadEvent(): ProgressEvent {
  return event('load')
}

export const settle = () => new Promise((resolve) => setTimeout(resolve, 0))
