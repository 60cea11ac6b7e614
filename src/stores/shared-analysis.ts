import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { SharedAnalysis } from '../../shared/schemas/share-links'
import { asApiError, type ApiError } from '@/api/http'
import * as shareApi from '@/api/share-links'

/** The one result a share link shows to someone without an account. */
export const useSharedAnalysisStore = defineStore('shared-analysis', () => {
  const shared = ref<SharedAnalysis | null>(null)
  const error = ref<ApiError | null>(null)
  let token: string | null = null

  async function open(linkToken: string): Promise<void> {
    token = linkToken
    shared.value = null
    error.value = null
    try {
      const found = await shareApi.openShared(linkToken)
      if (token === linkToken) shared.value = found
    } catch (e) {
      if (token === linkToken) error.value = asApiError(e)
    }
  }

  /** Where the browser downloads the unit table, when the link's creator allowed it. */
  function unitsCsvUrl(): string {
    return token ? shareApi.sharedUnitsCsvUrl(token) : ''
  }

  /** Where the browser downloads "check it in R", when the unit table is shared. */
  function rExportUrls(): { script: string; rows: string } | null {
    return token ? shareApi.sharedRExportUrls(token) : null
  }

  return { shared, error, open, unitsCsvUrl, rExportUrls }
})
