import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { FORMATS, formatOf } from '../../server/formats/index.ts'
import { CLIP_MEASURES } from '../../shared/measures'
import { SESSION_FORMATS } from '../../shared/schemas/sessions'
import { trialAnswer } from '../../shared/schemas/rating'
import type { ClipMeasures } from '../../shared/schemas/clips'
import { buildApp, type TestApp } from './helpers'

// The format and measure registries are what the rest of the server reads; these checks keep
// each registry whole, so a format or measure added in one place cannot be missing in another.

describe('session format registry', () => {
  it('has one module for every format the schemas accept, under its own name', () => {
    expect(Object.keys(FORMATS).sort()).toEqual([...SESSION_FORMATS].sort())
    for (const kind of SESSION_FORMATS) expect(formatOf(kind).kind).toBe(kind)
  })

  it('refuses a format it does not know', () => {
    expect(() => formatOf('tetrad' as never)).toThrow(/Unknown session format "tetrad"/)
  })

  it("takes each format's answers through the schema players' browsers use", () => {
    const samples = {
      rating: { kind: 'rating', values: { brightness: 40 } },
      pair: { kind: 'pair', preferred: 123, more: {} },
      triangle: { kind: 'triangle', odd: 456 },
      playtest: { kind: 'playtest', values: { warmth: 70 }, comment: '' },
    }
    for (const kind of SESSION_FORMATS) {
      const own = formatOf(kind).answer.safeParse(samples[kind])
      expect(own.success, kind).toBe(true)
      expect(trialAnswer.safeParse(samples[kind]).success, kind).toBe(true)
      // Another format's answer is not this format's.
      const other = SESSION_FORMATS.find((k) => k !== kind)!
      expect(formatOf(kind).answer.safeParse(samples[other]).success).toBe(false)
    }
  })
})

describe('clip measure registry', () => {
  let t: TestApp
  beforeAll(async () => {
    t = await buildApp()
  })
  afterAll(() => t.close())

  it('names a column of the clips table for every measure', async () => {
    const columns = ((await t.knex.raw('PRAGMA table_info(clips)')) as { name: string }[]).map(
      (c) => c.name,
    )
    for (const m of CLIP_MEASURES) expect(columns, m.column).toContain(m.column)
  })

  it('names a field of the clip API type for every measure, once', () => {
    const keys: (keyof ClipMeasures)[] = CLIP_MEASURES.map((m) => m.key)
    expect(new Set(keys).size).toBe(CLIP_MEASURES.length)
    expect(new Set(CLIP_MEASURES.map((m) => m.name)).size).toBe(CLIP_MEASURES.length)
  })
})
