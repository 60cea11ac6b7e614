import { onBeforeUnmount, ref } from 'vue'

/**
 * Copies text to the clipboard and remembers for two seconds which item was copied, so its button
 * can say "Copied". A refused clipboard (no permission, no secure context) simply shows nothing.
 */
export function useCopy(clipboard?: Pick<Clipboard, 'writeText'>) {
  const copied = ref<string | null>(null)
  let timer: ReturnType<typeof setTimeout> | undefined

  async function copy(key: string, text: string): Promise<void> {
    try {
      const board = clipboard ?? globalThis.navigator?.clipboard
      if (!board) throw new Error('no clipboard')
      await board.writeText(text)
      copied.value = key
    } catch {
      copied.value = null
    }
    clearTimeout(timer)
    timer = setTimeout(() => (copied.value = null), 2000)
  }

  onBeforeUnmount(() => clearTimeout(timer))
  return { copied, copy }
}
