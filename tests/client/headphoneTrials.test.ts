import { describe, expect, it } from 'vitest'
import { HEADPHONE_PASS as CONTRACT } from '@shared/schemas/rating'
import {
  HEADPHONE_PASS,
  headphonePassed,
  headphoneTrials,
  seededRandom,
  toneSamples,
  TONE,
} from '@/audio/headphoneTrials'

const rms = (x: Float32Array) => Math.sqrt(x.reduce((s, v) => s + v * v, 0) / x.length)

describe('the headphone check', () => {
  it('uses the pass mark of the shared contract: 5 of 6 (Woods et al. 2017)', () => {
    expect(HEADPHONE_PASS).toEqual(CONTRACT)
    expect(headphonePassed(5, 6)).toBe(true)
    expect(headphonePassed(4, 6)).toBe(false)
    expect(headphonePassed(3, 3)).toBe(false)
  })

  it('deals six trials, each with one tone of each kind, the answer being the quiet one', () => {
    const trials = headphoneTrials(seededRandom(7))
    expect(trials).toHaveLength(6)
    for (const t of trials) {
      expect([...t.tones].sort()).toEqual(['antiphase', 'quiet', 'reference'])
      expect(t.tones[t.answer]).toBe('quiet')
    }
  })

  it('puts the quiet tone in every position equally often and uses every order once', () => {
    const trials = headphoneTrials(seededRandom(42))
    expect(new Set(trials.map((t) => t.tones.join())).size).toBe(6)
    const positions = [0, 0, 0]
    for (const t of trials) positions[t.answer]++
    expect(positions).toEqual([2, 2, 2])
  })

  it('is reproducible from a seed and varies between seeds', () => {
    const a = headphoneTrials(seededRandom(3)).map((t) => t.answer)
    expect(headphoneTrials(seededRandom(3)).map((t) => t.answer)).toEqual(a)
    const others = [4, 5, 6, 8].map((s) => headphoneTrials(seededRandom(s)).map((t) => t.answer))
    expect(others.some((o) => o.join() !== a.join())).toBe(true)
  })

  it('makes 200 Hz tones of 1 s: the quiet one 6 dB down, the antiphase one inverted on the right', () => {
    const rate = 8000
    const [left, right] = toneSamples(['reference', 'antiphase', 'quiet'], rate)
    const len = TONE.seconds * rate
    const gap = TONE.gapSeconds * rate
    expect(left).toHaveLength(3 * len + 2 * gap)
    const tone = (ch: Float32Array, n: number) => ch.slice(n * (len + gap), n * (len + gap) + len)
    // Every tone starts and ends at silence: the ramps keep them from clicking.
    expect(tone(left, 0)[0]).toBe(0)
    expect(Math.abs(tone(left, 0)[len - 1])).toBeLessThan(1e-3)
    expect(tone(left, 0)).toEqual(tone(right, 0))
    for (let i = 0; i < len; i += 97) expect(tone(right, 1)[i]).toBeCloseTo(-tone(left, 1)[i], 7)
    const db = 20 * Math.log10(rms(tone(left, 2)) / rms(tone(left, 0)))
    expect(db).toBeCloseTo(-6, 2)
    // 200 Hz: 400 zero crossings a second in the steady middle of the tone.
    const mid = tone(left, 0).slice(rate * 0.25, rate * 0.75)
    let crossings = 0
    for (let i = 1; i < mid.length; i++) if (mid[i - 1] < 0 !== mid[i] < 0) crossings++
    expect(crossings).toBeGreaterThanOrEqual(199)
    expect(crossings).toBeLessThanOrEqual(201)
  })
})
