import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import type {
  DatasetDetail,
  DatasetSummary,
  DatasetUpdate,
  DatasetVersionDetail,
  DesignSummary,
  ExclusionCreate,
  Project,
  RowsPage,
  TaggingInput,
} from '../../shared/schemas/datasets'
import * as datasetsApi from '@/api/datasets'
import * as projectsApi from '@/api/projects'
import { ApiError, asApiError } from '@/api/http'

/**
 * Datasets as the screens see them: the list (by lab and project), the admin's deleted list, and one
 * open dataset with one of its versions, that version's saved design and a page of its rows. Each
 * action keeps its own error, so every screen shows the error that concerns the thing that failed.
 */
export const useDatasetsStore = defineStore('datasets', () => {
  // ------------------------------------------------------------ list
  const list = ref<DatasetSummary[]>([])
  const listLoaded = ref(false)
  const listLoading = ref(false)
  const listError = ref<ApiError | null>(null)
  const projects = ref<Project[]>([])
  const projectsError = ref<ApiError | null>(null)

  async function loadList(): Promise<void> {
    listLoading.value = true
    listError.value = null
    try {
      const [datasets, projectList] = await Promise.all([datasetsApi.listDatasets(), loadProjectsQuietly()])
      list.value = datasets
      if (projectList) projects.value = projectList
      listLoaded.value = true
    } catch (error) {
      listError.value = asApiError(error)
    } finally {
      listLoading.value = false
    }
  }

  /** Projects only decorate the list (descriptions, empty projects); their failure must not hide datasets. */
  async function loadProjectsQuietly(): Promise<Project[] | null> {
    projectsError.value = null
    try {
      return await projectsApi.listProjects()
    } catch (error) {
      projectsError.value = asApiError(error)
      return null
    }
  }

  async function loadProjects(): Promise<void> {
    const found = await loadProjectsQuietly()
    if (found) projects.value = found
  }

  // ------------------------------------------------------------ deleted (instance admins)
  const deleted = ref<DatasetSummary[]>([])
  const deletedLoading = ref(false)
  const deletedError = ref<ApiError | null>(null)
  const restoringId = ref<number | null>(null)
  const restoreError = ref<ApiError | null>(null)

  async function loadDeleted(): Promise<void> {
    deletedLoading.value = true
    deletedError.value = null
    try {
      deleted.value = await datasetsApi.listDatasets({ deleted: true })
    } catch (error) {
      deletedError.value = asApiError(error)
    } finally {
      deletedLoading.value = false
    }
  }

  async function restore(datasetId: number): Promise<boolean> {
    restoringId.value = datasetId
    restoreError.value = null
    try {
      await datasetsApi.restoreDataset(datasetId)
      deleted.value = deleted.value.filter((d) => d.id !== datasetId)
      return true
    } catch (error) {
      restoreError.value = asApiError(error)
      return false
    } finally {
      restoringId.value = null
    }
  }

  // ------------------------------------------------------------ one dataset, one version
  const current = ref<DatasetDetail | null>(null)
  const currentLoading = ref(false)
  const currentError = ref<ApiError | null>(null)
  const version = ref<DatasetVersionDetail | null>(null)
  const versionLoading = ref(false)
  const versionError = ref<ApiError | null>(null)
  const design = ref<DesignSummary | null>(null)
  const designError = ref<ApiError | null>(null)

  // Answers to an earlier open() that arrive after a later one are dropped.
  let openTicket = 0

  const isLatestVersion = computed(
    () => !!version.value && version.value.versionNo === current.value?.latestVersion?.versionNo,
  )

  async function open(datasetId: number, versionNo?: number): Promise<void> {
    const ticket = ++openTicket
    currentLoading.value = true
    currentError.value = null
    if (current.value?.id !== datasetId) {
      current.value = null
      version.value = null
      design.value = null
      rows.value = null
    }
    try {
      const detail = await datasetsApi.getDataset(datasetId)
      if (ticket !== openTicket) return
      current.value = detail
    } catch (error) {
      if (ticket === openTicket) currentError.value = asApiError(error)
      return
    } finally {
      if (ticket === openTicket) currentLoading.value = false
    }
    const wanted = versionNo ?? current.value?.latestVersion?.versionNo
    if (wanted !== undefined) await selectVersion(wanted, ticket)
  }

  async function selectVersion(versionNo: number, ticket = ++openTicket): Promise<void> {
    const dataset = current.value
    if (!dataset) return
    versionLoading.value = true
    versionError.value = null
    if (version.value?.versionNo !== versionNo) rows.value = null
    try {
      const detail = await datasetsApi.getVersion(dataset.id, versionNo)
      if (ticket !== openTicket) return
      version.value = detail
      await refreshDesign(ticket)
    } catch (error) {
      if (ticket === openTicket) versionError.value = asApiError(error)
    } finally {
      if (ticket === openTicket) versionLoading.value = false
    }
  }

  /** The saved nesting's unit counts over the rows kept now (exclusions change them). */
  async function refreshDesign(ticket = openTicket): Promise<void> {
    const dataset = current.value
    const shown = version.value
    designError.value = null
    if (!dataset || !shown?.tagging) {
      design.value = null
      return
    }
    try {
      const summary = await datasetsApi.getDesign(dataset.id, shown.versionNo)
      if (ticket === openTicket) design.value = summary
    } catch (error) {
      if (ticket === openTicket) {
        design.value = null
        designError.value = asApiError(error)
      }
    }
  }

  /** After an exclusion or a new tagging: counts on the version and the dataset changed. */
  async function reloadVersion(): Promise<void> {
    const dataset = current.value
    const shown = version.value
    if (!dataset || !shown) return
    try {
      version.value = await datasetsApi.getVersion(dataset.id, shown.versionNo)
      current.value = await datasetsApi.getDataset(dataset.id)
    } catch (error) {
      versionError.value = asApiError(error)
    }
    await refreshDesign()
  }

  // ------------------------------------------------------------ rows preview
  const rows = ref<RowsPage | null>(null)
  const rowsLoading = ref(false)
  const rowsError = ref<ApiError | null>(null)
  let rowsController: AbortController | null = null

  async function loadRows(request: datasetsApi.RowsRequest): Promise<void> {
    const dataset = current.value
    const shown = version.value
    if (!dataset || !shown) return
    rowsController?.abort()
    const controller = new AbortController()
    rowsController = controller
    rowsLoading.value = true
    rowsError.value = null
    try {
      rows.value = await datasetsApi.getRows(dataset.id, shown.versionNo, request, controller.signal)
    } catch (error) {
      if (error instanceof DOMException && error.name === 'AbortError') return
      rowsError.value = asApiError(error)
    } finally {
      if (rowsController === controller) rowsLoading.value = false
    }
  }

  // ------------------------------------------------------------ nesting
  const taggingSaving = ref(false)
  const taggingError = ref<ApiError | null>(null)

  async function saveTagging(input: TaggingInput): Promise<boolean> {
    const dataset = current.value
    const shown = version.value
    if (!dataset || !shown) return false
    taggingSaving.value = true
    taggingError.value = null
    try {
      const saved = await datasetsApi.saveTagging(dataset.id, shown.versionNo, input)
      if (version.value?.id === shown.id) {
        version.value = { ...version.value, tagging: saved.tagging }
        design.value = saved.design
        designError.value = null
      }
      return true
    } catch (error) {
      taggingError.value = asApiError(error)
      return false
    } finally {
      taggingSaving.value = false
    }
  }

  // ------------------------------------------------------------ exclusions
  const exclusionSaving = ref(false)
  const exclusionError = ref<ApiError | null>(null)
  const withdrawingId = ref<number | null>(null)
  const withdrawError = ref<ApiError | null>(null)

  async function addExclusion(input: ExclusionCreate): Promise<boolean> {
    const dataset = current.value
    const shown = version.value
    if (!dataset || !shown) return false
    exclusionSaving.value = true
    exclusionError.value = null
    try {
      await datasetsApi.addExclusion(dataset.id, shown.versionNo, input)
      await reloadVersion()
      return true
    } catch (error) {
      exclusionError.value = asApiError(error)
      return false
    } finally {
      exclusionSaving.value = false
    }
  }

  async function withdrawExclusion(exclusionId: number): Promise<boolean> {
    const dataset = current.value
    const shown = version.value
    if (!dataset || !shown) return false
    withdrawingId.value = exclusionId
    withdrawError.value = null
    try {
      await datasetsApi.withdrawExclusion(dataset.id, shown.versionNo, exclusionId)
      await reloadVersion()
      return true
    } catch (error) {
      withdrawError.value = asApiError(error)
      return false
    } finally {
      withdrawingId.value = null
    }
  }

  // ------------------------------------------------------------ name, description, deletion
  const detailsSaving = ref(false)
  const detailsError = ref<ApiError | null>(null)
  const deleting = ref(false)
  const deleteError = ref<ApiError | null>(null)

  async function updateDetails(changes: DatasetUpdate): Promise<boolean> {
    const dataset = current.value
    if (!dataset) return false
    detailsSaving.value = true
    detailsError.value = null
    try {
      current.value = await datasetsApi.updateDataset(dataset.id, changes)
      listLoaded.value = false
      return true
    } catch (error) {
      detailsError.value = asApiError(error)
      return false
    } finally {
      detailsSaving.value = false
    }
  }

  async function remove(): Promise<boolean> {
    const dataset = current.value
    if (!dataset) return false
    deleting.value = true
    deleteError.value = null
    try {
      await datasetsApi.deleteDataset(dataset.id)
      list.value = list.value.filter((d) => d.id !== dataset.id)
      current.value = null
      version.value = null
      return true
    } catch (error) {
      deleteError.value = asApiError(error)
      return false
    } finally {
      deleting.value = false
    }
  }

  /** A version uploaded from the dataset page becomes the one shown. */
  async function showUploadedVersion(uploaded: DatasetVersionDetail): Promise<void> {
    const dataset = current.value
    if (!dataset || uploaded.datasetId !== dataset.id) return
    const ticket = ++openTicket
    version.value = uploaded
    rows.value = null
    listLoaded.value = false
    try {
      const detail = await datasetsApi.getDataset(dataset.id)
      if (ticket === openTicket) current.value = detail
    } catch (error) {
      if (ticket === openTicket) currentError.value = asApiError(error)
    }
    await refreshDesign(ticket)
  }

  /** A dataset created by an upload is known to the list without asking the server again. */
  function remember(created: DatasetDetail): void {
    current.value = created
    version.value = null
    design.value = null
    rows.value = null
    listLoaded.value = false
  }

  return {
    list,
    listLoaded,
    listLoading,
    listError,
    projects,
    projectsError,
    loadList,
    loadProjects,
    deleted,
    deletedLoading,
    deletedError,
    restoringId,
    restoreError,
    loadDeleted,
    restore,
    current,
    currentLoading,
    currentError,
    version,
    versionLoading,
    versionError,
    design,
    designError,
    isLatestVersion,
    open,
    selectVersion,
    refreshDesign,
    rows,
    rowsLoading,
    rowsError,
    loadRows,
    taggingSaving,
    taggingError,
    saveTagging,
    exclusionSaving,
    exclusionError,
    withdrawingId,
    withdrawError,
    addExclusion,
    withdrawExclusion,
    detailsSaving,
    detailsError,
    updateDetails,
    deleting,
    deleteError,
    remove,
    showUploadedVersion,
    remember,
  }
})
