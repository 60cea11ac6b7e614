/**
 * Every chart formatter that returns HTML (echarts tooltips are HTML) builds it here, so a label
 * from an uploaded table ("<img src=x onerror=…>") is shown as text and never becomes an element.
 * Use the tagged template: the literal parts are our markup, every `${value}` is escaped.
 *
 *   chartHtml`${unit.label} · ${unit.condition}<br>observation: ${value}`
 *
 * Axis labels and legends are drawn as canvas or SVG text, not HTML: echarts' SVG writer escapes
 * text itself (zrender's encodeHTML), so they need no escaping, and escaping them would show "&lt;".
 */
const ENTITIES: Record<string, string> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
}

export function escapeHtml(text: unknown): string {
  return String(text ?? '').replace(/[&<>"']/g, (c) => ENTITIES[c]!)
}

/** Builds chart HTML: literal template parts kept, every interpolated value escaped. */
export function chartHtml(strings: TemplateStringsArray, ...values: unknown[]): string {
  return strings.reduce((html, part, i) => html + part + (i < values.length ? escapeHtml(values[i]) : ''), '')
}

/** Pieces already built by chartHtml, joined (its output is safe as it is). */
export function joinHtml(parts: string[], separator = '<br>'): string {
  return parts.join(separator)
}
