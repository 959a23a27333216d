import { afterEach, describe, expect, it } from 'vitest'
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils'
import { createPinia } from 'pinia'
import type { Component } from 'vue'
import VChart from 'vue-echarts'
import type { ECharts, TooltipComponentOption } from 'echarts'
import MeansChart from '@/components/charts/MeansChart.vue'
import ProfileChart from '@/components/charts/ProfileChart.vue'
import ScaleChart from '@/components/charts/ScaleChart.vue'
import ScatterPlot from '@/components/charts/ScatterPlot.vue'
import TrendChart from '@/components/charts/TrendChart.vue'
import { escapeHtml } from '@/components/charts/escapeHtml'

// A name someone could type for a recipe, attribute, end label or time point.
const HOSTILE = '<img src=x onerror=alert(1)><b>bold</b>'
const ESCAPED = '&lt;img src=x onerror=alert(1)&gt;&lt;b&gt;bold&lt;/b&gt;'
// What echarts hands a formatter as the colour dot of a series.
const MARKER = '<span style="background-color:#b86f1e;"></span>'

const mounted: VueWrapper[] = []
afterEach(() => mounted.splice(0).forEach((w) => w.unmount()))

async function draw(component: Component, props: Record<string, unknown>) {
  const w = mount(component, {
    props,
    global: { plugins: [createPinia()] },
    attachTo: document.body,
  })
  mounted.push(w)
  await flushPromises()
  const chart = (w.findComponent(VChart).vm as unknown as { chart?: ECharts }).chart
  if (!chart) throw new Error('the chart was not drawn')
  const tooltip = (chart.getOption().tooltip as TooltipComponentOption[])[0]
  expect(typeof tooltip.formatter, 'the chart builds its own tooltip').toBe('function')
  const formatter = tooltip.formatter as (p: unknown) => string
  return { w, chart, formatter }
}

/**
 * The formatter's HTML keeps the name as text: entities in the string, and the page's own HTML
 * parser (not our code) finds no element in it and reads the name back character for character.
 */
function expectText(html: string) {
  expect(html).toContain(ESCAPED)
  expect(html).not.toMatch(/<img|<b>/i)
  const parsed = document.createElement('template')
  parsed.innerHTML = html
  expect(parsed.content.querySelector('img, b')).toBeNull()
  expect(parsed.content.textContent).toContain(HOSTILE)
}

/** Shows the real tooltip and checks that nothing in the chart became an element. */
function expectShownAsText(w: VueWrapper, chart: ECharts, shown: string) {
  chart.dispatchAction({ type: 'showTip', seriesIndex: 0, dataIndex: 0 })
  expect(w.element.textContent).toContain(shown)
  expect(w.element.querySelector('img, b')).toBeNull()
}

const item = { dataIndex: 0, seriesIndex: 0, marker: MARKER }

describe('names in chart tooltips are text, not markup', () => {
  // The entities are the HTML standard's character references (WHATWG HTML, "Named character
  // references": amp, lt, gt, quot; &#39; is the numeric reference of U+0027).
  it('escapes the five characters that can open markup or end an attribute', () => {
    expect(escapeHtml(`a&b<c>d"e'f`)).toBe('a&amp;b&lt;c&gt;d&quot;e&#39;f')
    expect(escapeHtml('Harewood A — ébène 🎻')).toBe('Harewood A — ébène 🎻')
  })

  it('recipe means', async () => {
    const { w, chart, formatter } = await draw(MeansChart, {
      title: HOSTILE,
      low: HOSTILE,
      high: HOSTILE,
      items: [{ name: HOSTILE, mean: 40, lower: 30, upper: 50 }],
    })
    const html = formatter(item)
    expectText(html)
    expect(html).toBe(`${ESCAPED}: 40.0 (95% CI 30.0 to 50.0)`)
    expectShownAsText(w, chart, `${HOSTILE}: 40.0`)
  })

  it('recipe means without ratings', async () => {
    const { formatter } = await draw(MeansChart, {
      title: 'Warmth',
      low: 'cold',
      high: 'warm',
      items: [{ name: HOSTILE, mean: null, lower: null, upper: null }],
    })
    expect(formatter(item)).toBe(`${ESCAPED}: no ratings`)
  })

  it('attribute profile (attribute and recipe names)', async () => {
    const { w, chart, formatter } = await draw(ProfileChart, {
      attributes: [HOSTILE],
      recipes: [{ name: HOSTILE, means: [40] }],
    })
    const html = formatter([item])
    expectText(html)
    expect(html).toBe(`${ESCAPED}<br>${MARKER}${ESCAPED}: 40.0`)
    expectShownAsText(w, chart, `${HOSTILE}: 40.0`)
  })

  it('preference scale', async () => {
    const { w, chart, formatter } = await draw(ScaleChart, {
      axisName: HOSTILE,
      items: [{ name: HOSTILE, value: 0.25, se: 0.1 }],
    })
    const html = formatter(item)
    expectText(html)
    expect(html).toBe(`${ESCAPED}: 0.25 ± 0.10`)
    expectShownAsText(w, chart, `${HOSTILE}: 0.25`)
  })

  it('measured against perceived (measure and attribute names)', async () => {
    const { w, chart, formatter } = await draw(ScatterPlot, {
      title: HOSTILE,
      xName: HOSTILE,
      yName: HOSTILE,
      points: [
        { x: 0.0021, y: 40 },
        { x: 0.0034, y: 55 },
        { x: 0.0052, y: 61 },
      ],
    })
    const html = formatter(item)
    expectText(html)
    expect(html).toBe(`${ESCAPED}: 0.0021<br>${ESCAPED}: 40.0`)
    expectShownAsText(w, chart, `${HOSTILE}: 0.0021`)
  })

  it('over time (time point labels and recipe names)', async () => {
    const { w, chart, formatter } = await draw(TrendChart, {
      title: HOSTILE,
      labels: [HOSTILE, 'week 2'],
      series: [{ name: HOSTILE, values: [40, 45] }],
    })
    const html = formatter([item])
    expectText(html)
    expect(html).toBe(`${ESCAPED}<br>${MARKER}${ESCAPED}: 40.0`)
    expectShownAsText(w, chart, `${HOSTILE}: 40.0`)
  })
})
