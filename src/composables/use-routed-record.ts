import { computed, watch, type ComputedRef } from 'vue'
import { useRoute } from 'vue-router'

/**
 * The record a page shows, named by a route parameter (`/datasets/:datasetId`), and the version
 * asked for in `?version=` (undefined when absent or not a positive whole number). Opens the
 * record at once and again whenever the parameter changes; a parameter that is not a positive
 * whole number opens nothing, so the page keeps whatever it showed.
 *
 * @example
 * const { id: datasetId, versionQuery } = useRoutedRecord('datasetId', (id, v) => void datasets.open(id, v))
 */
export function useRoutedRecord(
  param: string,
  open: (id: number, versionNo: number | undefined) => void,
): { id: ComputedRef<number>; versionQuery: ComputedRef<number | undefined> } {
  const route = useRoute()
  const id = computed(() => Number(route.params[param]))
  const versionQuery = computed(() => {
    const n = Number(route.query.version)
    return Number.isInteger(n) && n > 0 ? n : undefined
  })
  watch(
    id,
    (value) => {
      if (Number.isInteger(value) && value > 0) open(value, versionQuery.value)
    },
    { immediate: true },
  )
  return { id, versionQuery }
}
