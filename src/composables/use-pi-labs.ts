import { computed } from 'vue'
import { ledLabs } from '../../shared/access'
import { useSessionStore } from '@/stores/session'

/**
 * The labs the signed-in person leads as PI (pages that a PI reads for one lab at a time: members,
 * audit log). Lab pickers read them with item-title="labName" item-value="labId".
 */
export function usePiLabs() {
  const session = useSessionStore()
  const piLabs = computed(() => ledLabs(session.user))
  return { piLabs }
}
