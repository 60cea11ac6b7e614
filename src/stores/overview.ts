import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import type { CurrentUser } from '../../shared/schemas/auth'
import { REVIEWER_ROLE, rolesOf } from '../../shared/access'
import { listAnalyses } from '@/api/analyses'
import { listDatasets } from '@/api/datasets'
import { listMyReviews } from '@/api/reviews'
import { overviewSteps, type OverviewFacts } from '@/components/overview/next-step'

/**
 * What the overview shows each person: their next steps by role, from their labs' datasets and
 * analyses and the reviews addressed to them, loaded side by side. A list that cannot be loaded
 * counts as unknown, and the steps fall back to the first-time advice rather than a blank page.
 */
export const useOverviewStore = defineStore('overview', () => {
  const facts = ref<OverviewFacts>({ datasets: null, analyses: null, reviews: null })
  const user = ref<CurrentUser | null>(null)
  const loading = ref(false)
  /** Set once the first load ended: before that no step shows (a first-time step would flash). */
  const loaded = ref(false)

  const steps = computed(() => (user.value && loaded.value ? overviewSteps(user.value, facts.value) : []))

  async function load(who: CurrentUser): Promise<void> {
    user.value = who
    if (!who.memberships.length) {
      facts.value = { datasets: [], analyses: [], reviews: [] }
      loaded.value = true
      return
    }
    loading.value = true
    const reviewer = rolesOf(who).has(REVIEWER_ROLE)
    const settle = async <T>(work: Promise<T>): Promise<T | null> => {
      try {
        return await work
      } catch {
        return null
      }
    }
    const [datasets, analyses, reviews] = await Promise.all([
      settle(listDatasets()),
      settle(listAnalyses()),
      reviewer ? settle(listMyReviews('open')) : Promise.resolve([]),
    ])
    facts.value = { datasets, analyses, reviews }
    loading.value = false
    loaded.value = true
  }

  return { facts, steps, loading, loaded, load }
})
