import { escapeHtml } from './escapeHtml'

/**
 * Tooltip text for the charts. Echarts puts a formatter's result into the page as HTML, while
 * titles, axis labels and legends are drawn as SVG text; so every chart builds its tooltip here,
 * from plain lines that are escaped one by one.
 */

/** What a tooltip formatter is told about one hovered point. */
export interface TipParam {
  dataIndex: number
  seriesIndex: number
  marker?: unknown
}

/** The hovered points: one for an item tooltip, one per series for an axis tooltip. */
export function tipParams(p: unknown): TipParam[] {
  return (Array.isArray(p) ? p : [p]) as TipParam[]
}

/** A number as a tooltip shows it; a missing one as a dash. */
export function tipNumber(x: number | null | undefined, digits = 1): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '—' : x.toFixed(digits)
}

const SIGNIFICANT = new Intl.NumberFormat('en', { maximumSignificantDigits: 4 })

/** A measure, whose size runs from loss factors of 0.002 to frequencies in the thousands. */
export function tipMeasure(x: number | null | undefined): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '—' : SIGNIFICANT.format(x)
}

/** Plain lines of text as tooltip HTML. */
export function textTooltip(lines: string[]): string {
  return lines.map(escapeHtml).join('<br>')
}

/**
 * A heading, then one line per series led by its colour dot. The dot is markup echarts builds
 * from our palette (it escapes the colour itself), so it is the one piece passed through.
 */
export function seriesTooltip(heading: string, rows: { param: TipParam; text: string }[]): string {
  const dot = (p: TipParam) => (typeof p.marker === 'string' ? p.marker : '')
  return [escapeHtml(heading), ...rows.map((r) => dot(r.param) + escapeHtml(r.text))].join('<br>')
}

/**
 * The formatter of an axis tooltip over lines of values: the axis heading, then each shown
 * series' name and value at that point. Nothing when every series is hidden from the legend.
 */
export function axisTooltip(
  headings: () => string[],
  series: () => { name: string; values: (number | null)[] }[],
): (p: unknown) => string {
  return (p) => {
    const shown = tipParams(p)
    if (!shown.length) return ''
    const lines = series()
    return seriesTooltip(
      headings()[shown[0].dataIndex],
      shown.map((param) => {
        const s = lines[param.seriesIndex]
        return { param, text: `${s.name}: ${tipNumber(s.values[param.dataIndex])}` }
      }),
    )
  }
}
