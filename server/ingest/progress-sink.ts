import type { UploadProgress } from '../../shared/schemas/datasets'

/**
 * Where ingest reports how far it got (the HTTP layer shows it to the uploader while the request
 * runs), and learns through `signal` that the uploader went away, so it stops and rolls back.
 */
export interface ProgressSink {
  signal?: AbortSignal
  update(
    change: Partial<Pick<UploadProgress, 'phase' | 'bytesRead' | 'bytesTotal' | 'rowsStored' | 'message'>>,
  ): void
}

export const noProgress: ProgressSink = { update: () => {} }
