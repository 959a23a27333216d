import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import LinkedText from '@/components/LinkedText.vue'

describe('LinkedText', () => {
  it('makes web addresses clickable', () => {
    const w = mount(LinkedText, {
      props: { text: 'Choose: http://localhost:3000/set-password?token=abc.def\nThanks' },
    })
    const a = w.find('a')
    expect(a.attributes('href')).toBe('http://localhost:3000/set-password?token=abc.def')
    expect(w.text()).toContain('Thanks')
  })

  it('never renders mail text as HTML', () => {
    const w = mount(LinkedText, { props: { text: '<img src=x onerror=alert(1)> hello' } })
    expect(w.find('img').exists()).toBe(false)
    expect(w.text()).toContain('<img src=x onerror=alert(1)>')
  })
})
