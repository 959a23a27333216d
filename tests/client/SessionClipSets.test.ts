import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import SessionClipSets from '@/components/SessionClipSets.vue'
import SetFormats from '@/components/SetFormats.vue'
import type { ResolvedClipSet } from '@shared/schemas/sessions'

// A set as the design review resolves it: two takes recorded differently, one rendition format.
const set: ResolvedClipSet = {
  key: 'scale · PF-01 · VN-3',
  clipIds: [11, 12],
  excerptName: 'scale',
  performerCode: 'PF-01',
  instrumentCode: 'VN-3',
  clips: [
    { id: 11, recipeId: 1, recipeName: 'Harewood A plain', originalName: 'a.wav', archived: false },
    { id: 12, recipeId: 2, recipeName: 'Harewood A heavy', originalName: 'b.wav', archived: false },
  ],
  twins: [],
  format: {
    originals: [
      { clipId: 11, sampleRate: 44_100, channels: 1, bitDepth: 16, durationS: 5 },
      { clipId: 12, sampleRate: 96_000, channels: 2, bitDepth: 24, durationS: 20 },
    ],
    rendition: { sampleRate: 48_000, channels: 2, bitDepth: 24, durationS: 5 },
    takes: 3,
    written: false,
  },
}

describe('the formats of chosen sets', () => {
  it('shows each take as recorded and the one format players hear', () => {
    const table = mount(SessionClipSets, { props: { sets: [set] } })
    const originals = table.findAll('[data-test="original-format"]').map((w) => w.text())
    expect(originals).toEqual([
      '· recorded 44.1 kHz · mono · 16-bit · 5.0 s',
      '· recorded 96 kHz · stereo · 24-bit · 20.0 s',
    ])
    const rendition = table.find('[data-test="rendition-format"]').text()
    expect(rendition).toContain('48 kHz · stereo · 24-bit · 5.0 s')
    expect(rendition).toContain('being made again')
  })

  it('lists the sets with their takes where the picker shows the saved design', () => {
    const list = mount(SetFormats, {
      props: { sets: [set, { ...set, key: 'x', format: undefined }] },
    })
    expect(list.findAll('[data-test="set-formats"] > li')).toHaveLength(1)
    expect(list.text()).toContain(
      'scale · PF-01 · VN-3: players hear 48 kHz · stereo · 24-bit · 5.0 s',
    )
    expect(list.text()).toContain('3 takes in the set decide')
    expect(list.text()).toContain('clip 12: recorded 96 kHz · stereo · 24-bit · 20.0 s')
  })
})
