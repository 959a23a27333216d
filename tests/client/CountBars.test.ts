import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import CountBars from '@/components/CountBars.vue'

describe('CountBars', () => {
  it('draws each bar in proportion to the largest count', () => {
    const w = mount(CountBars, { props: { title: 'By level', counts: { teacher: 4, student: 2 } } })
    const fills = w.findAll('.fill').map((f) => f.attributes('style'))
    expect(fills[0]).toContain('width: 100%')
    expect(fills[1]).toContain('width: 50%')
    expect(w.text()).toContain('By level')
  })

  it('copes with no counts at all', () => {
    const w = mount(CountBars, { props: { title: 'Empty', counts: { violin: 0 } } })
    expect(w.find('.fill').attributes('style')).toContain('width: 0%')
  })
})
