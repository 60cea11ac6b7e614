/**
 * The unit of a response, when its column name says it: "neurite_length_um" → "µm",
 * "soma area (µm²)" → "µm²", "latency_ms" → "ms". Null when the name does not say; the page then
 * gives numbers without a unit rather than guess. Case matters where it changes the meaning
 * ("mm" is a length, "mM" a concentration).
 */
const UNITS: Record<string, string> = {
  um: 'µm',
  µm: 'µm',
  μm: 'µm',
  micron: 'µm',
  microns: 'µm',
  um2: 'µm²',
  µm2: 'µm²',
  'µm²': 'µm²',
  nm: 'nm',
  mm: 'mm',
  cm: 'cm',
  ms: 'ms',
  s: 's',
  sec: 's',
  min: 'min',
  mV: 'mV',
  mv: 'mV',
  pA: 'pA',
  nA: 'nA',
  Hz: 'Hz',
  hz: 'Hz',
  mM: 'mM',
  uM: 'µM',
  µM: 'µM',
  nM: 'nM',
  mg: 'mg',
  ug: 'µg',
  µg: 'µg',
  ng: 'ng',
  ml: 'mL',
  mL: 'mL',
  ul: 'µL',
  uL: 'µL',
  µL: 'µL',
  pct: '%',
  percent: '%',
  '%': '%',
  au: 'a.u.',
  AU: 'a.u.',
}

export function responseUnit(column: string): string | null {
  const bracketed = /[([]\s*([^()[\]]+?)\s*[)\]]\s*$/.exec(column)
  if (bracketed) return UNITS[bracketed[1]] ?? null
  const tokens = column.split(/[_\s.-]+/).filter(Boolean)
  if (tokens.length < 2) return null
  return UNITS[tokens[tokens.length - 1]] ?? null
}

/** A number with its unit when known: "9.81 µm", "12 %"; the number alone otherwise. */
export function withUnit(text: string, unit: string | null): string {
  return unit ? `${text} ${unit}` : text
}
