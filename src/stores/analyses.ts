import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import type {
  AnalysisCreate,
  AnalysisDefaults,
  AnalysisDetail,
  AnalysisListItem,
  AnalysisSettingsPatch,
  AnalysisVersionDetail,
  AnalysisVersionStatus,
} from '../../shared/schemas/analyses'
import * as analysesApi from '@/api/analyses'
import { ApiError, asApiError } from '@/api/http'

/** How often a running version's small status document is asked for (the API suggests ~500 ms). */
export const POLL_MS = 500

const wait = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms))

/**
 * Analyses as the screens see them: the list, one open analysis with one of its versions (result and
 * chart once done) and, while that version runs, its status polled until it finishes.
 */
export const useAnalysesStore = defineStore('analyses', () => {
  // ------------------------------------------------------------ list
  const list = ref<AnalysisListItem[]>([])
  const listLoaded = ref(false)
  const listLoading = ref(false)
  const listError = ref<ApiError | null>(null)

  async function loadList(filter: { datasetId?: number } = {}): Promise<void> {
    listLoading.value = true
    listError.value = null
    try {
      list.value = await analysesApi.listAnalyses(filter)
      listLoaded.value = true
    } catch (error) {
      listError.value = asApiError(error)
    } finally {
      listLoading.value = false
    }
  }

  // ------------------------------------------------------------ one analysis
  const current = ref<AnalysisDetail | null>(null)
  const currentError = ref<ApiError | null>(null)
  const currentLoading = ref(false)
  const version = ref<AnalysisVersionDetail | null>(null)
  const versionError = ref<ApiError | null>(null)
  const versionLoading = ref(false)
  /** Live status of the shown version while it is queued or running. */
  const liveStatus = ref<AnalysisVersionStatus | null>(null)
  /** Bumped whenever a new poll loop starts, so an older loop knows to stop. */
  let pollToken = 0

  const isRunning = computed(() => {
    const status = liveStatus.value?.status ?? version.value?.status
    return status === 'queued' || status === 'running'
  })
  const latestVersionNo = computed(() => current.value?.versions[0]?.versionNo ?? null)

  async function open(analysisId: number, versionNo?: number): Promise<void> {
    currentLoading.value = true
    currentError.value = null
    if (current.value?.id !== analysisId) {
      current.value = null
      version.value = null
    }
    try {
      current.value = await analysesApi.getAnalysis(analysisId)
    } catch (error) {
      currentError.value = asApiError(error)
      return
    } finally {
      currentLoading.value = false
    }
    const wanted = versionNo ?? latestVersionNo.value
    if (wanted !== null) await selectVersion(wanted)
  }

  async function selectVersion(versionNo: number): Promise<void> {
    if (!current.value) return
    const analysisId = current.value.id
    const token = ++pollToken
    versionLoading.value = true
    versionError.value = null
    liveStatus.value = null
    try {
      const detail = await analysesApi.getVersion(analysisId, versionNo)
      if (token !== pollToken) return
      version.value = detail
      if (detail.status === 'queued' || detail.status === 'running')
        await follow(analysisId, versionNo, token)
    } catch (error) {
      if (token === pollToken) versionError.value = asApiError(error)
    } finally {
      if (token === pollToken) versionLoading.value = false
    }
  }

  /** Polls the status until the version is done or failed, then fetches it once with its result. */
  async function follow(analysisId: number, versionNo: number, token: number): Promise<void> {
    for (;;) {
      const status = await analysesApi.getVersionStatus(analysisId, versionNo)
      if (token !== pollToken) return
      liveStatus.value = status
      if (status.status === 'done' || status.status === 'failed') break
      await wait(POLL_MS)
      if (token !== pollToken) return
    }
    const detail = await analysesApi.getVersion(analysisId, versionNo)
    if (token !== pollToken) return
    version.value = detail
    liveStatus.value = null
    if (current.value?.id === analysisId) current.value = await analysesApi.getAnalysis(analysisId)
  }

  /** Stops following a running version (the page was left); the server keeps running it. */
  function stopFollowing(): void {
    pollToken++
  }

  // ------------------------------------------------------------ settings defaults
  /** What a new analysis (or version) of a dataset version starts from, and the columns it may use. */
  const defaults = ref<AnalysisDefaults | null>(null)
  const defaultsError = ref<ApiError | null>(null)
  const defaultsLoading = ref(false)

  async function loadDefaults(
    datasetId: number,
    datasetVersionNo?: number,
  ): Promise<AnalysisDefaults | null> {
    defaultsLoading.value = true
    defaultsError.value = null
    defaults.value = null
    try {
      defaults.value = await analysesApi.getDefaults(datasetId, datasetVersionNo)
      return defaults.value
    } catch (error) {
      defaultsError.value = asApiError(error)
      return null
    } finally {
      defaultsLoading.value = false
    }
  }

  // ------------------------------------------------------------ writes
  const creating = ref(false)
  const createError = ref<ApiError | null>(null)

  async function create(input: AnalysisCreate): Promise<AnalysisDetail | null> {
    creating.value = true
    createError.value = null
    try {
      const created = await analysesApi.createAnalysis(input)
      current.value = created
      version.value = null
      return created
    } catch (error) {
      createError.value = asApiError(error)
      return null
    } finally {
      creating.value = false
    }
  }

  const rerunning = ref(false)
  const rerunError = ref<ApiError | null>(null)

  /** Runs the analysis again with changed settings: a new version; the earlier ones stay as they are. */
  async function runNewVersion(settings: AnalysisSettingsPatch): Promise<number | null> {
    if (!current.value) return null
    rerunning.value = true
    rerunError.value = null
    try {
      const summary = await analysesApi.createVersion(current.value.id, { settings })
      current.value = await analysesApi.getAnalysis(current.value.id)
      return summary.versionNo
    } catch (error) {
      rerunError.value = asApiError(error)
      return null
    } finally {
      rerunning.value = false
    }
  }

  return {
    list,
    listLoaded,
    listLoading,
    listError,
    loadList,
    current,
    currentError,
    currentLoading,
    version,
    versionError,
    versionLoading,
    liveStatus,
    isRunning,
    latestVersionNo,
    open,
    selectVersion,
    stopFollowing,
    defaults,
    defaultsError,
    defaultsLoading,
    loadDefaults,
    creating,
    createError,
    create,
    rerunning,
    rerunError,
    runNewVersion,
  }
})
