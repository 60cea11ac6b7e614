import type { UploadProgress } from '../../shared/schemas/datasets'
import type { ProgressSink } from '../ingest/progress-sink'

type Phase = UploadProgress['phase']

// Keyed by user as well, so two people choosing the same token never see or overwrite each other's entry.
const keyOf = (token: string, userId: number) => `${userId}:${token}`

interface Entry {
  userId: number
  progress: UploadProgress
  touchedAt: number
}

/** Finished entries stay readable this long, so a client polling slowly still sees the end state. */
const KEEP_FINISHED_MS = 10 * 60 * 1000
/** Entries of uploads that never finished (a dropped connection) are forgotten after this. */
const KEEP_UNFINISHED_MS = 6 * 60 * 60 * 1000

/**
 * In-memory progress of uploads in flight, keyed by a token the client chose. One server process
 * runs the ingest, so memory is the right place; entries are private to the user who uploads.
 */
export class UploadProgressRegistry {
  private readonly entries = new Map<string, Entry>()

  start(token: string, userId: number, bytesTotal: number): ProgressSink {
    this.prune()
    const entry: Entry = {
      userId,
      touchedAt: Date.now(),
      progress: { token, phase: 'receiving', bytesRead: 0, bytesTotal, rowsStored: 0, message: null },
    }
    this.entries.set(keyOf(token, userId), entry)
    return {
      update: (change) => {
        entry.progress = { ...entry.progress, ...change }
        entry.touchedAt = Date.now()
      },
    }
  }

  /** Only the uploader sees their progress; for anyone else the token is unknown. */
  get(token: string, userId: number): UploadProgress | null {
    return this.entries.get(keyOf(token, userId))?.progress ?? null
  }

  finish(
    token: string,
    userId: number,
    phase: Extract<Phase, 'done' | 'failed'>,
    message: string | null = null,
  ): void {
    const entry = this.entries.get(keyOf(token, userId))
    if (!entry) return
    entry.progress = {
      ...entry.progress,
      phase,
      message,
      bytesRead: phase === 'done' ? entry.progress.bytesTotal : entry.progress.bytesRead,
    }
    entry.touchedAt = Date.now()
  }

  private prune(): void {
    const now = Date.now()
    for (const [token, entry] of this.entries) {
      const finished = entry.progress.phase === 'done' || entry.progress.phase === 'failed'
      if (now - entry.touchedAt > (finished ? KEEP_FINISHED_MS : KEEP_UNFINISHED_MS))
        this.entries.delete(token)
    }
  }
}

export const uploadProgress = new UploadProgressRegistry()
