import { flushPromises } from '@vue/test-utils'

/**
 * Waits until a mounted page has finished its chain of requests: promises, then one timer turn
 * (for work a component or the router puts behind setTimeout), then promises again.
 */
export async function settle(): Promise<void> {
  await flushPromises()
  await new Promise((resolve) => setTimeout(resolve, 0))
  await flushPromises()
}
