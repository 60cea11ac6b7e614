import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { AuditEvent } from '../../shared/schemas/audit'
import * as adminApi from '@/api/admin'
import type { AuditFilters } from '@/api/audit-query'
import * as labsApi from '@/api/labs'
import { ApiError, asApiError } from '@/api/http'

/** Where the log is read: one lab (its PIs, admins) or the whole instance (admins). */
export type AuditScope = { kind: 'lab'; labId: number } | { kind: 'instance' }

export const useAuditLogStore = defineStore('audit-log', () => {
  const items = ref<AuditEvent[]>([])
  const total = ref(0)
  const loading = ref(false)
  const error = ref<ApiError | null>(null)
  let latest = 0

  async function load(scope: AuditScope, filters: AuditFilters): Promise<void> {
    // Filters change quickly; only the newest answer may fill the table.
    const ticket = ++latest
    loading.value = true
    error.value = null
    try {
      const page =
        scope.kind === 'lab'
          ? await labsApi.labAudit(scope.labId, filters)
          : await adminApi.instanceAudit(filters)
      if (ticket !== latest) return
      items.value = page.items
      total.value = page.total
    } catch (err) {
      if (ticket === latest) error.value = asApiError(err)
    } finally {
      if (ticket === latest) loading.value = false
    }
  }

  return { items, total, loading, error, load }
})
