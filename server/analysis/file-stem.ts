/** A file-name-safe stem of an analysis name: ASCII letters, digits, "-" and "_", at most 80 characters. */
export function fileStem(analysisName: string): string {
  const base = analysisName
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .replace(/[^A-Za-z0-9_-]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 80)
  return base || 'analysis'
}
