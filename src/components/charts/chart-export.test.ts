import { describe, expect, it } from 'vitest'
import { fileStem, framedOption, TITLE_SPACE } from './chart-export'

describe('exported figures', () => {
  it('carry a title and the n, with the legend and the plot moved down to make room', () => {
    const option = {
      legend: { top: 4, data: ['Nimbus', 'Nested error bar'] },
      grid: { left: 64, top: 56, bottom: 48 },
      series: [],
    }
    const framed = framedOption(
      option,
      { text: 'Neurite length: neurite_length_um', subtext: 'n = 1,341 observations in 24 units of “mouse”' },
      '#111',
    ) as typeof option & { title: { text: string; subtext: string } }
    expect(framed.title).toMatchObject({
      text: 'Neurite length: neurite_length_um',
      subtext: 'n = 1,341 observations in 24 units of “mouse”',
    })
    expect(framed.legend).toEqual({ top: 4 + TITLE_SPACE, data: ['Nimbus', 'Nested error bar'] })
    expect(framed.grid).toMatchObject({ left: 64, top: 56 + TITLE_SPACE })
    // The page's own option is left as it was.
    expect(option.grid.top).toBe(56)
  })

  it('names files with letters, digits, "-" and "_" only', () => {
    expect(fileStem('Neurite length, NW-117 vs vehicle - observations (SEM)')).toBe(
      'Neurite-length-NW-117-vs-vehicle-observations-SEM',
    )
  })
})
