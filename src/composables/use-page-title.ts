import { watchEffect } from 'vue'

/**
 * The browser tab's title from what the page shows ("Neurite length, NW-117 vs vehicle · Nestwise"),
 * once it is known; until then the route's own title (set by the router) stays. Several tabs of
 * analyses can then be told apart.
 */
export function usePageTitle(title: () => string | null | undefined): void {
  watchEffect(() => {
    const text = title()
    if (text) document.title = `${text} · Nestwise`
  })
}
