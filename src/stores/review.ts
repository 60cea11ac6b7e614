import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { ReviewState } from '../../shared/schemas/reviews'
import * as reviewsApi from '@/api/reviews'
import { asApiError, type ApiError } from '@/api/http'

/**
 * The review of the analysis version on screen: sign-off state, requests, comments and the
 * version's fingerprint. One store, so the sign-off chip beside the version selector, the printed
 * header and the review panel read the same state, and a sign-off shows in all of them at once.
 */
export const useReviewStore = defineStore('review', () => {
  const key = ref<{ analysisId: number; versionNo: number } | null>(null)
  const state = ref<ReviewState | null>(null)
  const loadError = ref<ApiError | null>(null)
  const actionError = ref<ApiError | null>(null)
  const busy = ref(false)

  async function load(analysisId: number, versionNo: number): Promise<void> {
    if (key.value?.analysisId !== analysisId || key.value.versionNo !== versionNo) state.value = null
    key.value = { analysisId, versionNo }
    try {
      const loaded = await reviewsApi.getReviewState(analysisId, versionNo)
      // A newer version may have been opened while this one loaded.
      if (key.value?.analysisId === analysisId && key.value.versionNo === versionNo) state.value = loaded
      loadError.value = null
    } catch (error) {
      loadError.value = asApiError(error)
    }
  }

  async function reload(): Promise<void> {
    if (key.value) await load(key.value.analysisId, key.value.versionNo)
  }

  /** Runs a change (request, comment, decision) and reads the state again; false when it failed. */
  async function act(work: () => Promise<unknown>): Promise<boolean> {
    busy.value = true
    actionError.value = null
    try {
      await work()
      await reload()
      return true
    } catch (error) {
      actionError.value = asApiError(error)
      return false
    } finally {
      busy.value = false
    }
  }

  return { key, state, loadError, actionError, busy, load, reload, act }
})
