import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import ClipPreviewDrawer from '@/components/ClipPreviewDrawer.vue'
import { clip, fakeServer, on } from './fakeServer'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

async function preview(c: ReturnType<typeof clip>) {
  fakeServer(
    on('GET', `/clips/${c.id}`, () => ({ body: { clip: { ...c, peaks: { min: [], max: [] } } } })),
  )
  const w = mount(ClipPreviewDrawer, {
    props: { clipId: null },
    global: { plugins: [createPinia()], stubs: { ClipWaveform: true } },
    attachTo: document.body,
  })
  await w.setProps({ clipId: c.id })
  await flushPromises()
  const rows = new Map<string, string>()
  const labels = document.querySelectorAll('.n-descriptions-table-header')
  const values = document.querySelectorAll('.n-descriptions-table-content')
  labels.forEach((l, i) => rows.set(l.textContent!.trim(), values[i]?.textContent!.trim() ?? ''))
  return rows
}

// Which measure a recording has follows the product brief (flow 2, clips): decay time and loss
// factor for plucked notes, attack time for bowed onsets; loudness, centroid and f0 for both.
describe('the clip preview', () => {
  it('lists a bowed clip’s measures, with attack time and no decay', async () => {
    const rows = await preview(clip({ kind: 'bowed', attackS: 0.052 }))
    expect(rows.get('Loudness')).toBe('-12.7 LUFS')
    expect(rows.get('Spectral centroid')).toBe('1521 Hz')
    expect(rows.get('Fundamental (f0)')).toBe('524 Hz')
    expect(rows.get('Attack time')).toBe('52 ms')
    expect(rows.has('Decay (T60)')).toBe(false)
    expect(rows.get('Sample peak')).toBe('-9.0 dBFS')
    expect(rows.get('Duration')).toBe('3.85 s')
  })

  it('lists a plucked clip’s decay and loss factor, and no attack time', async () => {
    // η = 2.2 / (f · T60) (the brief's decay measure): 2.2 / (440 Hz · 2.5 s) = 0.002.
    const rows = await preview(
      clip({ kind: 'plucked', f0Hz: 440, t60S: 2.5, lossFactor: 0.002, attackS: null }),
    )
    expect(rows.get('Decay (T60)')).toBe('2.50 s')
    expect(rows.get('Loss factor η')).toBe('2.00e-3')
    expect(rows.has('Attack time')).toBe(false)
  })

  it('marks an archived clip', async () => {
    await preview(clip({ archivedAt: '2026-11-20T09:00:00Z' }))
    expect(document.querySelector('[data-test=clip-preview] h2')?.textContent).toContain('Archived')
  })
})
