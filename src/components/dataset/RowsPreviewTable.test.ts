// @vitest-environment happy-dom
import { flushPromises } from '@vue/test-utils'
import { afterEach, describe, expect, it } from 'vitest'
import type { RowsRequest } from '@/api/datasets'
import { exclusion, rowsPage } from '@/testing/datasets'
import { mountWithVuetify } from '@/testing/mount-with-vuetify'
import RowsPreviewTable from './RowsPreviewTable.vue'

afterEach(() => {
  document.body.innerHTML = ''
})

const columns = ['lab', 'mouse', 'condition', 'neuron', 'neurite.length (µm)']

async function table(overrides: Record<string, unknown> = {}) {
  const wrapper = mountWithVuetify(RowsPreviewTable, {
    columns,
    page: rowsPage({ columns }),
    loading: false,
    error: null,
    exclusions: [exclusion({ reason: 'Traced across two <i>crossing</i> neurites' })],
    excludedRowCount: 4,
    ...overrides,
  })
  await flushPromises()
  return wrapper
}

const loads = (wrapper: Awaited<ReturnType<typeof table>>) =>
  (wrapper.emitted('load') ?? []).map(([request]) => request as RowsRequest)

describe('RowsPreviewTable', () => {
  it('asks for the first page as soon as it is shown', async () => {
    const wrapper = await table()
    expect(loads(wrapper)[0]).toEqual({
      page: 1,
      pageSize: 25,
      sortBy: undefined,
      sortDesc: undefined,
      show: undefined,
    })
  })

  it('shows the rows as text, marks missing values and rows left out', async () => {
    const wrapper = await table()
    const rows = wrapper.findAll('[data-testid="rows-row"]')
    expect(rows.map((r) => r.attributes('data-row'))).toEqual(['2', '3'])
    expect(rows[0].find('[data-testid="row-excluded-mark"]').exists()).toBe(true)
    expect(rows[0].classes()).toContain('rows-table__excluded')
    expect(rows[1].find('[data-testid="row-excluded-mark"]').exists()).toBe(false)
    expect(rows[1].find('[aria-label="missing"]').text()).toBe('—')
    expect(rows[0].findAll('td').map((td) => td.text())).toEqual([
      '2',
      'nimbus',
      'm1',
      'vehicle',
      '1',
      '105.5',
    ])
  })

  it('sorts by the column clicked, by its name even when the name holds a dot', async () => {
    const wrapper = await table()
    const header = wrapper.findAll('th').find((th) => th.text().includes('neurite.length (µm)'))!
    await header.find('.v-data-table-header__content').trigger('click')
    await flushPromises()
    expect(loads(wrapper).at(-1)).toMatchObject({
      page: 1,
      sortBy: 'neurite.length (µm)',
      sortDesc: undefined,
    })
    await header.find('.v-data-table-header__content').trigger('click')
    await flushPromises()
    expect(loads(wrapper).at(-1)).toMatchObject({ sortBy: 'neurite.length (µm)', sortDesc: true })
  })

  it('pages on the server', async () => {
    const wrapper = await table()
    await wrapper.find('button[aria-label="Next page"]').trigger('click')
    await flushPromises()
    expect(loads(wrapper).at(-1)).toMatchObject({ page: 2, pageSize: 25 })
  })

  it('shows only the rows left out when asked, from the first page', async () => {
    const wrapper = await table()
    await wrapper.find('[data-testid="rows-show-excluded"]').trigger('click')
    expect(loads(wrapper).at(-1)).toMatchObject({ page: 1, show: 'excluded' })
    expect(wrapper.find('[data-testid="rows-show-excluded"]').text()).toBe('Left out (4)')
  })
})
