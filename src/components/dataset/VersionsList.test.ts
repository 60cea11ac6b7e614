// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { versionSummary } from '@/testing/datasets'
import { mountWithVuetify } from '@/testing/mount-with-vuetify'
import VersionsList from './VersionsList.vue'

afterEach(() => {
  document.body.innerHTML = ''
})

describe('VersionsList', () => {
  const versions = [
    versionSummary({
      id: 2,
      versionNo: 2,
      byteSize: 28_400_000,
      sha256: 'c'.repeat(64),
      fileType: 'xlsx',
      delimiter: null,
      sheetName: 'Cells',
      originalFilename: 'neurites-v2.xlsx',
    }),
    versionSummary({ delimiter: ';', decimalMark: ',', encoding: 'windows-1252' }),
  ]

  it('shows each version’s fingerprint, size, how it was read and where to get the original', () => {
    const wrapper = mountWithVuetify(VersionsList, { versions, shownVersionNo: 2 })
    const items = wrapper.findAll('[data-testid="version-item"]')
    expect(items.map((i) => i.attributes('data-version'))).toEqual(['2', '1'])
    expect(items[0].find('[data-testid="version-sha"]').text()).toBe('c'.repeat(64))
    expect(items[0].find('[data-testid="version-size"]').text()).toBe('28.4 MB')
    expect(items[0].text()).toContain('Excel workbook, sheet “Cells”')
    expect(items[1].text()).toContain('semicolon-separated, windows-1252, decimal comma')
    expect(items[1].find('a').attributes('href')).toBe('/api/v1/datasets/1/versions/1/original')
  })

  it('offers to show the versions not shown', async () => {
    const wrapper = mountWithVuetify(VersionsList, { versions, shownVersionNo: 2 })
    const buttons = wrapper.findAll('[data-testid="version-show"]')
    expect(buttons).toHaveLength(1)
    await buttons[0].trigger('click')
    expect(wrapper.emitted('show')).toEqual([[1]])
  })
})
