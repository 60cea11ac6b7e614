import { computed, onBeforeUnmount, ref } from 'vue'
import type { UploadProgress } from '../../shared/schemas/datasets'
import { getUploadProgress, newUploadToken, type UploadCallbacks } from '@/api/datasets'
import { ApiError, asApiError } from '@/api/http'

/**
 * 'sending': bytes travel to the server (XMLHttpRequest progress); 'processing': the server reads,
 * checks and stores the rows (polled from its progress endpoint); then 'done', 'failed' or 'cancelled'.
 */
export type UploadStage = 'idle' | 'sending' | 'processing' | 'done' | 'failed' | 'cancelled'

/** How often the server's parsing progress is asked for; its work takes seconds for large tables. */
export const PROGRESS_POLL_MS = 400

/**
 * Runs one upload at a time and exposes its progress: the transfer, then the server's work.
 * `run` receives the callbacks to hand to uploadDataset / uploadVersion.
 */
export function useDatasetUpload() {
  const stage = ref<UploadStage>('idle')
  const sent = ref(0)
  const total = ref(0)
  const server = ref<UploadProgress | null>(null)
  const error = ref<ApiError | null>(null)
  let controller: AbortController | null = null
  let pollTimer: ReturnType<typeof setTimeout> | null = null
  let polling = false

  const busy = computed(() => stage.value === 'sending' || stage.value === 'processing')

  function stopPolling(): void {
    polling = false
    if (pollTimer !== null) clearTimeout(pollTimer)
    pollTimer = null
  }

  /** All bytes are with the server: from now on the second bar tells the story. */
  function markSent(): void {
    if (stage.value !== 'sending') return
    sent.value = total.value
    stage.value = 'processing'
  }

  function startPolling(token: string, signal: AbortSignal): void {
    polling = true
    const tick = async () => {
      try {
        const progress = await getUploadProgress(token, signal)
        if (!polling) return
        server.value = progress
        // Some browsers report no upload events (or none for small bodies); the server's phase
        // also says when the transfer is over.
        if (progress.phase !== 'receiving') {
          total.value = Math.max(total.value, progress.bytesTotal)
          markSent()
        }
      } catch {
        // Progress is a courtesy: the upload's own answer decides success or failure.
      }
      if (polling) pollTimer = setTimeout(tick, PROGRESS_POLL_MS)
    }
    pollTimer = setTimeout(tick, PROGRESS_POLL_MS)
  }

  async function run<T>(work: (callbacks: UploadCallbacks) => Promise<T>): Promise<T | null> {
    if (busy.value) return null
    controller = new AbortController()
    const signal = controller.signal
    const token = newUploadToken()
    stage.value = 'sending'
    sent.value = 0
    total.value = 0
    server.value = null
    error.value = null
    startPolling(token, signal)
    try {
      const result = await work({
        token,
        signal,
        onTransfer: (progress) => {
          sent.value = progress.loaded
          total.value = progress.total
        },
        onSent: markSent,
      })
      stage.value = 'done'
      return result
    } catch (caught) {
      if (caught instanceof DOMException && caught.name === 'AbortError') {
        stage.value = 'cancelled'
      } else {
        error.value = asApiError(caught)
        stage.value = 'failed'
      }
      return null
    } finally {
      stopPolling()
      controller = null
    }
  }

  function cancel(): void {
    controller?.abort()
  }

  function reset(): void {
    if (busy.value) return
    stage.value = 'idle'
    error.value = null
    server.value = null
    sent.value = 0
    total.value = 0
  }

  onBeforeUnmount(() => {
    cancel()
    stopPolling()
  })

  return { stage, sent, total, server, error, busy, run, cancel, reset }
}
