import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { ErrorBarType } from '../../shared/schemas/analyses'

export const ERROR_BAR_STORAGE_KEY = 'nestwise.errorBar'

/** The error-bar kinds in the order the switch shows them (kept here so no zod loads with the charts). */
export const ERROR_BAR_TYPES: readonly ErrorBarType[] = ['sem', 'sd', 'ci95']

export function isErrorBarType(value: unknown): value is ErrorBarType {
  return typeof value === 'string' && (ERROR_BAR_TYPES as readonly string[]).includes(value)
}

type StorageLike = Pick<Storage, 'getItem' | 'setItem'>

/** Storage can throw (privacy modes) or be missing (tests, server): the choice then lasts for the visit. */
function storage(): StorageLike | undefined {
  try {
    return globalThis.localStorage
  } catch {
    return undefined
  }
}

function readStored(): ErrorBarType {
  try {
    const saved = storage()?.getItem(ERROR_BAR_STORAGE_KEY)
    return isErrorBarType(saved) ? saved : 'sem'
  } catch {
    return 'sem'
  }
}

/**
 * How this viewer likes results drawn, remembered on this browser: which error bar the charts
 * show (SEM, SD or 95 % CI). A display preference, not part of what an analysis computes, so it
 * is the same on the result page, the printable report and a shared link.
 */
export const useDisplayPreferencesStore = defineStore('display-preferences', () => {
  const errorBar = ref<ErrorBarType>(readStored())

  function setErrorBar(type: ErrorBarType): void {
    if (!isErrorBarType(type)) return
    errorBar.value = type
    try {
      storage()?.setItem(ERROR_BAR_STORAGE_KEY, type)
    } catch {
      // kept for this visit only
    }
  }

  return { errorBar, setErrorBar }
})
