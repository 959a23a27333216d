import { describe, expect, it } from 'vitest'
import { setPicture } from '../../../server/player/picture'

// Expected envelopes worked by hand: per column the lowest minimum and highest maximum of any
// source, after its gain (+6.0206 dB doubles an amplitude, −6.0206 dB halves it).

const flat = (n: number, v: number) => ({ min: Array(n).fill(-v), max: Array(n).fill(v) })

describe('the one picture of a matched set', () => {
  it('is the envelope of every clip at its gain, the same whichever clip is playing', () => {
    const loud = { peaks: { min: [-0.1, -0.4], max: [0.2, 0.4] }, duration: 2, gainDb: 0 }
    const quiet = {
      peaks: { min: [-0.5, -0.1], max: [0.3, 0.1] },
      duration: 2,
      gainDb: 20 * Math.log10(0.5),
    }
    const picture = setPicture([loud, quiet], 2, 2)!
    expect(picture).toEqual({ duration: 2, min: [-0.25, -0.4], max: [0.2, 0.4] })
    expect(setPicture([quiet, loud], 2, 2)).toEqual(picture)
  })

  it('covers the shortest clip’s length, mapping longer clips by time', () => {
    // 4 s at one peak per second against 2 s: only the first two seconds of the longer count.
    const long = {
      peaks: { min: [-0.1, -0.1, -0.9, -0.9], max: [0.1, 0.1, 0.9, 0.9] },
      duration: 4,
      gainDb: 0,
    }
    const short = { peaks: flat(2, 0.2), duration: 2, gainDb: 0 }
    expect(setPicture([long, short], undefined, 2)).toEqual({
      duration: 2,
      min: [-0.2, -0.2],
      max: [0.2, 0.2],
    })
  })

  it('draws nothing when no clip has peaks', () => {
    expect(setPicture([{ peaks: { min: [], max: [] }, duration: 2, gainDb: 0 }])).toBeNull()
    expect(setPicture([])).toBeNull()
  })

  it('keeps 600 columns, rounded finer than any screen shows', () => {
    const p = setPicture([{ peaks: flat(48_000, 0.123456), duration: 10, gainDb: 0 }])!
    expect(p.max).toHaveLength(600)
    expect(p.max[0]).toBe(0.123)
  })
})
