/** One plain sentence per term the dataset screens use; shown on hover. */
export const terms = {
  observations:
    'Observations are the rows of the table: one measured cell, neurite or well each. They are not independent of each other.',
  independentUnits:
    'Independent units are the biological replicates, such as animals or separately prepared cultures; comparisons count these, not the rows.',
  nestingLevel:
    'A nesting level is a column that groups rows into units; each level sits inside the one above it (cells in mice in labs).',
  response:
    'The response is what you compare: a measured number (neurite length), a yes/no value (marker-positive) or a count (puncta).',
  condition:
    'The condition is what differs between the groups you compare, such as vehicle versus compound; it is optional.',
  conditions:
    'Conditions are what differ between the groups you compare, such as genotype and treatment; pick none, one, or two (then fitted with their interaction).',
  covariate:
    'A covariate is a measured number that also affects the response, such as soma size; comparisons are adjusted for it and its slope is reported.',
  reference:
    'The reference level is the one the other levels of a condition are compared with, such as vehicle.',
  reusedLabels:
    'The same label under different parents (mouse “m1” in two labs) names different units; Nestwise keys each unit by its full path.',
  exclusion:
    'An exclusion leaves rows out of analyses, with a written reason; the rows stay stored and can be counted in again.',
  version:
    'Each upload is a version that never changes; analyses name the version they used, so they can be repeated exactly.',
  sha256:
    'The SHA-256 is a fingerprint of the file’s exact bytes: the same file always gives the same fingerprint.',
  missing: 'Missing values are empty cells or markers such as NA or NaN.',
  distinct: 'How many different values the column holds (missing values not counted).',
} as const

export type Term = keyof typeof terms
