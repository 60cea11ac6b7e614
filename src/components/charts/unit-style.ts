/**
 * Colours and shapes for units in charts. Seven hues of a colour-blind-safe set (Okabe & Ito's
 * "color universal design" palette without black, which vanishes on the dark theme); past seven
 * units the hues repeat with another marker shape, so every unit stays tellable apart.
 */
export const UNIT_HUES = [
  '#0072B2',
  '#E69F00',
  '#009E73',
  '#CC79A7',
  '#56B4E9',
  '#D55E00',
  '#B8A900',
] as const
export const UNIT_SYMBOLS = ['circle', 'rect', 'triangle', 'diamond'] as const
export const SYMBOL_WORDS: Record<(typeof UNIT_SYMBOLS)[number], string> = {
  circle: 'circle',
  rect: 'square',
  triangle: 'triangle',
  diamond: 'diamond',
}

export interface UnitStyle {
  color: string
  symbol: (typeof UNIT_SYMBOLS)[number]
  /** Index of the (colour, shape) pair; units sharing it look the same. */
  styleIndex: number
}

export function unitStyle(index: number): UnitStyle {
  const hue = index % UNIT_HUES.length
  const shape = Math.floor(index / UNIT_HUES.length) % UNIT_SYMBOLS.length
  return { color: UNIT_HUES[hue], symbol: UNIT_SYMBOLS[shape], styleIndex: shape * UNIT_HUES.length + hue }
}

/** Distinct looks available before two units look the same. */
export const DISTINCT_UNIT_STYLES = UNIT_HUES.length * UNIT_SYMBOLS.length
