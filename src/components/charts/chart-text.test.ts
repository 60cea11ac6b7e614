import { describe, expect, it } from 'vitest'
import { chartHtml, escapeHtml } from './chart-text'

describe('chart text', () => {
  it('escapes what HTML would read as markup', () => {
    expect(escapeHtml(`<img src=x onerror="alert('x')"> & co`)).toBe(
      '&lt;img src=x onerror=&quot;alert(&#39;x&#39;)&quot;&gt; &amp; co',
    )
  })
  it('keeps its own markup and escapes every value put into it', () => {
    const label = '<img src=x>'
    expect(chartHtml`${label} · ${'WT'}<br>observation: ${12.5}`).toBe(
      '&lt;img src=x&gt; · WT<br>observation: 12.5',
    )
  })
  it('writes nothing for a missing value', () => {
    expect(chartHtml`a${null}b${undefined}c`).toBe('abc')
  })
})
