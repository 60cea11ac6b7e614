import { defineStore } from 'pinia'
import { ref } from 'vue'
import type {
  MailDelivery,
  OutboxMessage,
  OutboxStatus,
  ReceivedMail,
  ReceivedMailSummary,
} from '../../shared/schemas/mail'
import * as adminApi from '@/api/admin'
import { ApiError, asApiError } from '@/api/http'

/** The admin Outbox page: what was queued and sent, and what the local fake SMTP server caught. */
export const useOutboxStore = defineStore('outbox', () => {
  const delivery = ref<MailDelivery | null>(null)
  const outbox = ref<OutboxMessage[]>([])
  const outboxTotal = ref(0)
  const outboxLoading = ref(false)
  const outboxError = ref<ApiError | null>(null)
  const received = ref<ReceivedMailSummary[]>([])
  const receivedTotal = ref(0)
  const receivedLoading = ref(false)
  const receivedError = ref<ApiError | null>(null)
  const opened = ref<ReceivedMail | null>(null)
  const opening = ref(false)
  const openError = ref<ApiError | null>(null)
  const retryingId = ref<number | null>(null)
  const retryError = ref<ApiError | null>(null)

  async function loadDelivery(): Promise<void> {
    try {
      delivery.value = await adminApi.mailDelivery()
    } catch {
      // Only decorates the header; the lists show their own errors.
      delivery.value = null
    }
  }

  async function loadOutbox(
    page: number,
    pageSize: number,
    status: OutboxStatus | null = null,
  ): Promise<void> {
    outboxLoading.value = true
    outboxError.value = null
    try {
      const result = await adminApi.listOutbox({ page, pageSize, status })
      outbox.value = result.items
      outboxTotal.value = result.total
    } catch (error) {
      outboxError.value = asApiError(error)
    } finally {
      outboxLoading.value = false
    }
  }

  async function loadReceived(page: number, pageSize: number): Promise<void> {
    receivedLoading.value = true
    receivedError.value = null
    try {
      const result = await adminApi.listReceivedMails({ page, pageSize })
      received.value = result.items
      receivedTotal.value = result.total
    } catch (error) {
      receivedError.value = asApiError(error)
    } finally {
      receivedLoading.value = false
    }
  }

  async function open(id: number): Promise<void> {
    opening.value = true
    openError.value = null
    opened.value = null
    try {
      opened.value = await adminApi.getReceivedMail(id)
    } catch (error) {
      openError.value = asApiError(error)
    } finally {
      opening.value = false
    }
  }

  function close(): void {
    opened.value = null
    openError.value = null
  }

  async function retry(id: number): Promise<boolean> {
    retryingId.value = id
    retryError.value = null
    try {
      const updated = await adminApi.retryOutboxMessage(id)
      outbox.value = outbox.value.map((m) => (m.id === id ? updated : m))
      return true
    } catch (error) {
      retryError.value = asApiError(error)
      return false
    } finally {
      retryingId.value = null
    }
  }

  return {
    delivery,
    outbox,
    outboxTotal,
    outboxLoading,
    outboxError,
    received,
    receivedTotal,
    receivedLoading,
    receivedError,
    opened,
    opening,
    openError,
    retryingId,
    retryError,
    loadDelivery,
    loadOutbox,
    loadReceived,
    open,
    close,
    retry,
  }
})
