import { init, type EChartsCoreOption } from 'echarts/core'

/** File-name-safe stem: letters, digits, "-" and "_". */
export function fileStem(name: string): string {
  const stem = name
    .normalize('NFKD')
    .replace(/[^A-Za-z0-9_-]+/g, '-')
    .replace(/^-+|-+$/g, '')
  return stem.slice(0, 80) || 'chart'
}

export function downloadUrl(url: string, fileName: string): void {
  const link = document.createElement('a')
  link.href = url
  link.download = fileName
  document.body.appendChild(link)
  link.click()
  link.remove()
}

/**
 * Draws the option once more with the SVG renderer, off screen and without animation, and returns
 * the SVG document: a vector figure for papers, whatever renderer the page uses.
 */
export function renderSvg(
  option: EChartsCoreOption,
  width: number,
  height: number,
  background: string,
): string {
  const host = document.createElement('div')
  const chart = init(host, null, { renderer: 'svg', ssr: true, width, height })
  try {
    chart.setOption({ ...option, animation: false, backgroundColor: background })
    return chart.renderToSVGString()
  } finally {
    chart.dispose()
  }
}
