import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import LineScale from '@/components/player/LineScale.vue'

// A line scale records any point on the first touch, the middle included (the product brief,
// shared/DESIGN.md §5: every answer is saved as it is given).

const attribute = { key: 'warmth', name: 'Warmth', low: 'thin', high: 'warm' }

describe('a fresh line scale', () => {
  it('records the middle on the first click, where the thumb already sits', async () => {
    const scale = mount(LineScale, { props: { attribute, value: undefined } })
    const input = scale.get('input[type=range]')
    expect((input.element as HTMLInputElement).value).toBe('50')
    // The browser fires no input event when a click lands on the value it already has.
    await input.trigger('click')
    expect(scale.emitted('change')).toEqual([[50]])
  })

  it('records the middle on Enter, for a keyboard', async () => {
    const scale = mount(LineScale, { props: { attribute, value: undefined } })
    await scale.get('input').trigger('keydown', { key: 'Enter' })
    expect(scale.emitted('change')).toEqual([[50]])
  })

  it('does not record twice once rated, and never when disabled', async () => {
    const rated = mount(LineScale, { props: { attribute, value: 70 } })
    await rated.get('input').trigger('click')
    expect(rated.emitted('change')).toBeUndefined()
    const locked = mount(LineScale, { props: { attribute, value: undefined, disabled: true } })
    await locked.get('input').trigger('click')
    expect(locked.emitted('change')).toBeUndefined()
  })

  it('shows it was recorded', async () => {
    const scale = mount(LineScale, { props: { attribute, value: undefined } })
    expect(scale.text()).toContain('Not rated yet')
    await scale.setProps({ value: 50 })
    expect(scale.text()).toContain('Rated')
    expect(scale.get('input').attributes('aria-valuetext')).toBe('50 of 100, from thin to warm')
  })
})
