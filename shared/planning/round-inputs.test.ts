import { describe, expect, it } from 'vitest'
import { roundInputs } from './round-inputs'

describe('roundInputs', () => {
  it('keeps four significant digits of SDs and the difference, three decimals of the ICC', () => {
    const rounded = roundInputs({
      icc: 0.383712,
      spread: { kind: 'components', sdBetween: 19.299919646047865, sdWithin: 24.465958928248504 },
      difference: 7.619431734895755,
      costPerUnit: 100,
      costPerObs: 1,
      outer: { name: 'lab', minLabs: 4, maxLabs: 4, effectSd: 3.14159265, sdBetweenLabs: null },
    })
    expect(rounded.outer).toMatchObject({ effectSd: 3.142, sdBetweenLabs: null, minLabs: 4 })
    expect(rounded).toMatchObject({
      icc: 0.384,
      spread: { kind: 'components', sdBetween: 19.3, sdWithin: 24.47 },
      difference: 7.619,
      costPerUnit: 100,
    })
  })
})
