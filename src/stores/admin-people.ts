import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { LabCreate, LabSummary } from '../../shared/schemas/labs'
import type { AdminUserListItem } from '../../shared/schemas/users'
import * as adminApi from '@/api/admin'
import * as labsApi from '@/api/labs'
import { ApiError, asApiError } from '@/api/http'

/** Every lab and every person of the instance, for its administrators. */
export const useAdminPeopleStore = defineStore('admin-people', () => {
  const labs = ref<LabSummary[]>([])
  const users = ref<AdminUserListItem[]>([])
  const loading = ref(false)
  const loaded = ref(false)
  const loadError = ref<ApiError | null>(null)
  const creating = ref(false)
  const createError = ref<ApiError | null>(null)

  async function load(): Promise<void> {
    loading.value = true
    loadError.value = null
    try {
      const [allLabs, people] = await Promise.all([labsApi.listLabs(), adminApi.listUsers()])
      labs.value = allLabs
      users.value = people
      loaded.value = true
    } catch (error) {
      loadError.value = asApiError(error)
    } finally {
      loading.value = false
    }
  }

  async function createLab(input: LabCreate): Promise<LabSummary | null> {
    creating.value = true
    createError.value = null
    try {
      const { lab } = await adminApi.createLab(input)
      labs.value = await labsApi.listLabs()
      return lab
    } catch (error) {
      createError.value = asApiError(error)
      return null
    } finally {
      creating.value = false
    }
  }

  return { labs, users, loading, loaded, loadError, creating, createError, load, createLab }
})
