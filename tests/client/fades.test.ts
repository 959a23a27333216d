import { describe, expect, it } from 'vitest'
import {
  FADE_SECONDS,
  gainAt,
  raisedCosine,
  rampCurve,
  targetGains,
  wrapPosition,
} from '@/audio/fades'

describe('switching ramps', () => {
  it('last 5 ms, the length BS.1534 asks for', () => {
    expect(FADE_SECONDS).toBe(0.005)
  })

  it('follow a raised cosine: 0 and 1 at the ends, half way at the middle, never overshooting', () => {
    expect(raisedCosine(0)).toBe(0)
    expect(raisedCosine(1)).toBeCloseTo(1, 12)
    expect(raisedCosine(0.5)).toBeCloseTo(0.5, 12)
    // Computed: 0.5 − 0.5·cos(π/4) = 0.1464466…
    expect(raisedCosine(0.25)).toBeCloseTo(0.1464466094, 9)
    expect(raisedCosine(-1)).toBe(0)
    expect(raisedCosine(2)).toBe(1)
  })

  it('make curves that start and end on the gains asked for and move one way only', () => {
    const up = rampCurve(0, 1, 64)
    expect(up).toHaveLength(64)
    expect(up[0]).toBe(0)
    expect(up[63]).toBeCloseTo(1, 6)
    for (let i = 1; i < up.length; i++) expect(up[i]).toBeGreaterThanOrEqual(up[i - 1])
    const down = rampCurve(0.3, 0)
    expect(down[0]).toBeCloseTo(0.3, 6)
    expect(down.at(-1)).toBeCloseTo(0, 6)
  })

  it('give the gain part-way through a ramp, so a quick second switch starts from there', () => {
    const ramp = { from: 0, to: 1, start: 10, duration: FADE_SECONDS }
    expect(gainAt(ramp, 9)).toBe(0)
    expect(gainAt(ramp, 10 + FADE_SECONDS / 2)).toBeCloseTo(0.5, 9)
    expect(gainAt(ramp, 11)).toBe(1)
  })

  it('raise only the chosen clip', () => {
    expect(targetGains(3, 1)).toEqual([0, 1, 0])
  })

  it('wrap the playhead inside a loop as a looping source does', () => {
    const loop = { start: 1, end: 2 }
    expect(wrapPosition(0.5, loop, 10)).toBe(0.5)
    expect(wrapPosition(1.5, loop, 10)).toBe(1.5)
    expect(wrapPosition(2.25, loop, 10)).toBeCloseTo(1.25, 9)
    expect(wrapPosition(4.5, loop, 10)).toBeCloseTo(1.5, 9)
    expect(wrapPosition(12, null, 10)).toBe(10)
  })
})
