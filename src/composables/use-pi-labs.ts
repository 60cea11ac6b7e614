import { computed } from 'vue'
import { useSessionStore } from '@/stores/session'

/**
 * The labs the signed-in person leads as PI, and the same labs as items for a lab picker
 * (pages that a PI reads for one lab at a time: members, audit log).
 */
export function usePiLabs() {
  const session = useSessionStore()
  const piLabs = computed(() => (session.user?.memberships ?? []).filter((m) => m.role === 'pi'))
  const piLabItems = computed(() => piLabs.value.map((m) => ({ value: m.labId, title: m.labName })))
  return { piLabs, piLabItems }
}
