import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import ClipSetPicker from '@/components/ClipSetPicker.vue'
import type { MatchedSetSection } from '@shared/schemas/clips'
import type { ResolvedClipSet } from '@shared/schemas/sessions'
import { fakeServer, on } from './fakeServer'

afterEach(() => vi.unstubAllGlobals())

// The library as GET /api/clips/matched-sets offers it: archived clip 31 is left out, so the
// phrase set no longer holds a clip of recipe 2, and the scale set (clips 40, 41) is gone.
const sections: MatchedSetSection[] = [
  {
    instrument: 'violin',
    stringName: 'A',
    recipes: [
      { id: 1, name: 'Harewood A plain', version: 1 },
      { id: 2, name: 'Harewood A heavy', version: 1 },
    ],
    sets: [
      {
        excerptId: 3,
        excerptName: 'phrase',
        performerCode: 'PF-02',
        instrumentCode: 'VN-3',
        cells: { 1: [7] },
        complete: false,
        targetLufs: -23,
      },
    ],
  },
]
const clipOf = (id: number, recipeId: number, archived: boolean) => ({
  id,
  recipeId,
  recipeName: recipeId === 1 ? 'Harewood A plain' : 'Harewood A heavy',
  originalName: `${id}.wav`,
  archived,
})
// The saved design, keyed as the demo designs are ("excerpt · performer · instrument").
const saved: ResolvedClipSet[] = [
  {
    key: 'phrase · PF-02 · VN-3',
    clipIds: [7, 31],
    excerptName: 'phrase',
    performerCode: 'PF-02',
    instrumentCode: 'VN-3',
    clips: [clipOf(7, 1, false), clipOf(31, 2, true)],
    twins: [],
  },
  {
    key: 'scale · PF-01 · VN-3',
    clipIds: [40, 41],
    excerptName: 'scale',
    performerCode: 'PF-01',
    instrumentCode: 'VN-3',
    clips: [clipOf(40, 1, true), clipOf(41, 2, true)],
    twins: [],
  },
]

async function picker() {
  fakeServer(on('GET', '/clips/matched-sets', () => ({ body: { sections } })))
  const w = mount(ClipSetPicker, {
    props: {
      recipeIds: [1, 2],
      disabled: true,
      saved,
      modelValue: saved.map((s) => ({ key: s.key, clipIds: s.clipIds })),
    },
  })
  await flushPromises()
  return w
}

describe('the clip-set picker of a saved design', () => {
  it('shows a chosen set as chosen even when the design keyed it otherwise', async () => {
    const w = await picker()
    const phrase = w.findAll('tbody tr').find((tr) => tr.text().startsWith('phrase'))!
    expect(phrase.find('.n-checkbox--checked').exists()).toBe(true)
  })

  it('marks the archived clip it keeps instead of calling the recipe missing', async () => {
    const w = await picker()
    const phrase = w.findAll('tbody tr').find((tr) => tr.text().startsWith('phrase'))!
    expect(phrase.text()).toContain('Archived: clip 31 (Harewood A heavy)')
    expect(phrase.text()).not.toContain('lacks')
  })

  it('still lists a chosen set whose clips are all archived', async () => {
    const w = await picker()
    const kept = w.find('[data-test=kept-set]')
    expect(kept.text()).toContain('scale')
    expect(kept.text()).toContain('Archived: kept in this design')
  })
})

describe('takes in the clip-set picker', () => {
  const twoTakes: MatchedSetSection[] = [
    {
      ...sections[0],
      sets: [{ ...sections[0].sets[0], cells: { 1: [7, 8], 2: [9] }, complete: true }],
    },
  ]

  it('shows how many takes each recipe has and chooses the second as the twin', async () => {
    fakeServer(on('GET', '/clips/matched-sets', () => ({ body: { sections: twoTakes } })))
    const w = mount(ClipSetPicker, { props: { recipeIds: [1, 2], modelValue: [] } })
    await flushPromises()
    const takes = w.find('[data-test=takes]')
    expect(takes.text()).toContain('Harewood A plain 2 · Harewood A heavy 1')
    expect(takes.text()).toContain('one take: Harewood A heavy')

    await w.find('tbody .n-checkbox').trigger('click')
    const chosen = w.emitted('update:modelValue')!.at(-1)![0]
    expect(chosen).toEqual([{ key: '3|PF-02|VN-3', clipIds: [7, 9], twinClipIds: [8] }])
  })
})
