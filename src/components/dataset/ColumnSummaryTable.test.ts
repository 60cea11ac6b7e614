// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { neuriteColumns } from '@/testing/datasets'
import { mountWithVuetify } from '@/testing/mount-with-vuetify'
import ColumnSummaryTable from './ColumnSummaryTable.vue'

afterEach(() => {
  document.body.innerHTML = ''
})

describe('ColumnSummaryTable', () => {
  it('gives type, distinct values, missing values and the range of each column', () => {
    const wrapper = mountWithVuetify(ColumnSummaryTable, { columns: neuriteColumns, rowCount: 72 })
    const cells = (name: string) =>
      wrapper
        .find(`[data-column="${name}"]`)
        .findAll('td')
        // Whitespace collapses on screen as it does here.
        .map((td) => td.text().replace(/\s+/g, ' '))
    expect(cells('neurite_length_um')).toEqual([
      '5',
      'neurite_length_um',
      'Numbers',
      '65',
      '2 (2.8%)',
      '63.6',
      '105.5',
      '83.19',
    ])
    expect(cells('lab')).toEqual(['1', 'labnimbus, fernhill, larkspur', 'Text', '3', '0', '—', '—', '—'])
    expect(cells('neuron')[2]).toBe('Whole numbers')
  })

  it('says "at least" when there were too many distinct values to count', () => {
    const capped = { ...neuriteColumns[3], distinctCount: 65_535, distinctCapped: true }
    const wrapper = mountWithVuetify(ColumnSummaryTable, { columns: [capped], rowCount: 1_000_000 })
    expect(wrapper.findAll('[data-testid="column-row"] td')[3].text()).toBe('≥ 65,535')
  })
})
