export type TextPart = { kind: 'text'; text: string } | { kind: 'link'; text: string; href: string }

// http(s) addresses up to the next white space; a closing bracket or sentence mark at the end is
// punctuation, not part of the address.
const URL_PATTERN = /https?:\/\/[^\s<>"]+/g
const TRAILING = /[).,;:!?'\]]+$/

/**
 * Splits mail text into plain runs and links, so the Outbox page can show clickable links
 * without rendering any markup from the message.
 */
export function textParts(text: string): TextPart[] {
  const parts: TextPart[] = []
  let last = 0
  for (const match of text.matchAll(URL_PATTERN)) {
    const raw = match[0]
    const href = raw.replace(TRAILING, '')
    const start = match.index
    if (start > last) parts.push({ kind: 'text', text: text.slice(last, start) })
    parts.push({ kind: 'link', text: href, href })
    last = start + href.length
  }
  if (last < text.length) parts.push({ kind: 'text', text: text.slice(last) })
  return parts
}
