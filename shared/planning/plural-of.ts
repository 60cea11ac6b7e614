const IRREGULAR: Record<string, string> = {
  mouse: 'mice',
  child: 'children',
  person: 'people',
  fish: 'fish',
  sheep: 'sheep',
}

/** Plural of a level name for running text ("mouse" → "mice", "plate" → "plates", "day" → "days"). */
export function pluralOf(word: string): string {
  const lower = word.toLowerCase()
  if (IRREGULAR[lower])
    return word === lower ? IRREGULAR[lower] : IRREGULAR[lower][0].toUpperCase() + IRREGULAR[lower].slice(1)
  if (/(s|x|z|ch|sh)$/i.test(word)) return `${word}es`
  if (/[^aeiou]y$/i.test(word)) return `${word.slice(0, -1)}ies`
  return `${word}s`
}
