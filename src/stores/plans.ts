import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { Project } from '../../shared/schemas/datasets'
import type {
  Plan,
  PlanCreate,
  PlanDefaults,
  PlanDraftInput,
  PlanInputsInput,
  PlanResult,
} from '../../shared/schemas/plans'
import * as plansApi from '@/api/plans'
import { listProjects } from '@/api/projects'
import { asApiError, type ApiError } from '@/api/http'

/** Time the planner waits after the last change of a number before it asks the server again. */
export const PREVIEW_DELAY_MS = 250

/**
 * The planner as the screens see it: the saved plans of the user's labs (and their projects), the
 * plan or analysis the numbers start from, and the server's answer to the numbers on the form,
 * asked for again a moment after each change (an older request is cancelled when a newer starts).
 */
export const usePlansStore = defineStore('plans', () => {
  const list = ref<Plan[]>([])
  const projects = ref<Project[]>([])
  const loadError = ref<ApiError | null>(null)
  /** The saved plan the planner shows, when it was opened on one. */
  const saved = ref<Plan | null>(null)
  /** Inputs suggested by an analysis, when the planner was opened from one. */
  const defaults = ref<PlanDefaults | null>(null)

  const result = ref<PlanResult | null>(null)
  const previewError = ref<ApiError | null>(null)
  const computing = ref(false)
  const saving = ref(false)
  const saveError = ref<ApiError | null>(null)

  async function loadList(): Promise<void> {
    loadError.value = null
    try {
      const [plans, allProjects] = await Promise.all([plansApi.listPlans(), listProjects()])
      list.value = plans
      projects.value = allProjects
    } catch (error) {
      loadError.value = asApiError(error)
    }
  }

  /** Opens a saved plan; null (and loadError set) when it cannot be read. */
  async function openPlan(planId: number): Promise<Plan | null> {
    defaults.value = null
    try {
      saved.value = await plansApi.getPlan(planId)
      return saved.value
    } catch (error) {
      loadError.value = asApiError(error)
      return null
    }
  }

  /** Starts from a finished analysis version; null (and loadError set) when it cannot be read. */
  async function startFromAnalysis(analysisId: number, versionNo: number): Promise<PlanDefaults | null> {
    saved.value = null
    try {
      defaults.value = await plansApi.planDefaults(analysisId, versionNo)
      return defaults.value
    } catch (error) {
      loadError.value = asApiError(error)
      return null
    }
  }

  function startBlank(): void {
    saved.value = null
    defaults.value = null
  }

  let pending: AbortController | null = null
  let timer: ReturnType<typeof setTimeout> | null = null
  /**
   * Asks the server for the answer to these inputs, after a short pause; the latest request wins.
   * `computing` is set at once, so the page shows progress from the first moment, not only once
   * the request leaves.
   */
  function preview(inputs: PlanInputsInput, delay = PREVIEW_DELAY_MS): Promise<void> {
    if (timer) clearTimeout(timer)
    computing.value = true
    return new Promise((resolve) => {
      timer = setTimeout(async () => {
        timer = null
        pending?.abort()
        const controller = (pending = new AbortController())
        try {
          result.value = await plansApi.previewPlan(inputs, controller.signal)
          previewError.value = null
        } catch (error) {
          if (!controller.signal.aborted) previewError.value = asApiError(error)
        } finally {
          if (pending === controller && timer === null) computing.value = false
          resolve()
        }
      }, delay)
    })
  }

  /** True while the form has no difference to detect: there is nothing to plan yet. */
  const needsDifference = ref(false)
  /**
   * The form's numbers: previewed once they hold a difference; until then no answer is shown (an
   * answer to the previous difference would mislead) and the page asks for one.
   */
  function previewDraft(draft: PlanDraftInput, delay = PREVIEW_DELAY_MS): Promise<void> {
    const difference = draft.difference
    needsDifference.value = difference === null || difference === undefined || !(difference > 0)
    if (!needsDifference.value) return preview({ ...draft, difference: difference as number }, delay)
    if (timer) clearTimeout(timer)
    timer = null
    pending?.abort()
    pending = null
    computing.value = false
    result.value = null
    previewError.value = null
    return Promise.resolve()
  }

  /** Saves new inputs as a plan, or renames and moves the open saved plan. The saved plan, or null. */
  async function save(
    input: Omit<PlanCreate, 'inputs' | 'source'> & { inputs: PlanDraftInput },
  ): Promise<Plan | null> {
    const difference = input.inputs.difference
    if (difference === null || difference === undefined) return null
    saving.value = true
    saveError.value = null
    try {
      if (saved.value) {
        saved.value = await plansApi.updatePlan(saved.value.id, {
          name: input.name,
          projectId: input.projectId,
        })
      } else {
        const source = defaults.value
          ? { analysisId: defaults.value.source.analysisId, versionNo: defaults.value.source.versionNo }
          : null
        saved.value = await plansApi.createPlan({ ...input, inputs: { ...input.inputs, difference }, source })
      }
      list.value = await plansApi.listPlans()
      return saved.value
    } catch (error) {
      saveError.value = asApiError(error)
      return null
    } finally {
      saving.value = false
    }
  }

  /** Deletes a plan; true when it was the open one. */
  async function remove(plan: Plan): Promise<boolean> {
    try {
      await plansApi.deletePlan(plan.id)
      list.value = list.value.filter((p) => p.id !== plan.id)
      if (saved.value?.id === plan.id) {
        saved.value = null
        return true
      }
    } catch (error) {
      saveError.value = asApiError(error)
    }
    return false
  }

  return {
    list,
    projects,
    loadError,
    saved,
    defaults,
    result,
    previewError,
    computing,
    needsDifference,
    saving,
    saveError,
    loadList,
    openPlan,
    startFromAnalysis,
    startBlank,
    preview,
    previewDraft,
    save,
    remove,
  }
})
