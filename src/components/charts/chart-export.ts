import { init, type EChartsCoreOption } from 'echarts/core'

/** File-name-safe stem: letters, digits, "-" and "_". */
export function fileStem(name: string): string {
  const stem = name
    .normalize('NFKD')
    .replace(/[^A-Za-z0-9_-]+/g, '-')
    .replace(/-{2,}/g, '-')
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

/** A figure's title and its subtitle (what it shows, n), drawn into exported images. */
export interface ExportTitle {
  text: string
  subtext: string
}

/** Height the title and subtitle take at the top of an exported figure. */
export const TITLE_SPACE = 54

/**
 * The option as a stand-alone figure for a slide or a paper: title and subtitle (n) at the top,
 * the legend and the plot moved down to make room. The page's chart stays as it is (its title is
 * the page's heading). Legends already in the option are kept; this adds none.
 */
export function framedOption(option: EChartsCoreOption, title: ExportTitle, text: string): EChartsCoreOption {
  const shift = (part: unknown): unknown => {
    if (Array.isArray(part)) return part.map(shift)
    if (!part || typeof part !== 'object') return part
    const top = (part as { top?: unknown }).top
    return { ...part, top: typeof top === 'number' ? top + TITLE_SPACE : TITLE_SPACE + 8 }
  }
  return {
    ...option,
    title: {
      text: title.text,
      subtext: title.subtext,
      left: 12,
      top: 6,
      textStyle: { color: text, fontSize: 15, fontWeight: 600 },
      subtextStyle: { color: text, fontSize: 12 },
    },
    ...(option.legend ? { legend: shift(option.legend) } : {}),
    ...(option.grid ? { grid: shift(option.grid) } : {}),
  }
}

/**
 * Draws the option once more with the canvas renderer, off screen, and returns a PNG data URL at
 * twice the size (sharp on slides). Used for exports, so the exported figure can differ from the
 * page's chart (title, n).
 */
export function renderPng(
  option: EChartsCoreOption,
  width: number,
  height: number,
  background: string,
): string {
  const host = document.createElement('div')
  host.style.cssText = `position:fixed;left:-10000px;top:0;width:${width}px;height:${height}px`
  document.body.appendChild(host)
  const chart = init(host, null, { renderer: 'canvas', width, height, devicePixelRatio: 2 })
  try {
    chart.setOption({ ...option, animation: false, backgroundColor: background })
    return chart.getDataURL({ type: 'png', pixelRatio: 2, backgroundColor: background })
  } finally {
    chart.dispose()
    host.remove()
  }
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
