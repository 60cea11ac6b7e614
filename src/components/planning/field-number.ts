/** A number field's value as a number: typed text may use a decimal comma ("0,05"). */
export function fieldNumber(value: string | number): number {
  return typeof value === 'number' ? value : Number(String(value).replace(',', '.'))
}
