import { describe, expect, it } from 'vitest'
import { attackTime, synth, waveformPeaks } from '../../../server/audio/index.ts'

const RATE = 48_000

describe('attack time', () => {
  // The synthetic note's amplitude rises linearly over T, so (computed) it crosses 20 dB below
  // its steady level (a tenth of the amplitude) at 0.1·T and 3 dB below at 10^(−3/20)·T =
  // 0.708·T: the attack is 0.608·T. The 20 ms window is centred, so a linear rise reads on time;
  // where the rise meets the held level the window averages over the corner, so a rise not much
  // longer than the window reads up to a quarter window (5 ms) long.
  it.each([0.05, 0.15, 0.4])('reads 0.608·T for a linear rise over T = %f s', (rise) => {
    const note = synth.bowedTone({ f0: 196, seconds: 2, attackSeconds: rise, delaySeconds: 0.5 })
    const result = attackTime(note, RATE)!
    expect(Math.abs(result.attackSeconds - (10 ** (-3 / 20) - 0.1) * rise)).toBeLessThan(0.005)
    expect(Math.abs(result.onsetSeconds - (0.5 + 0.1 * rise))).toBeLessThan(0.005)
  })

  it('does not depend on the lead-in: none, silence or room noise, 0 to 1 s', () => {
    for (const rise of [0.02, 0.1, 0.3]) {
      const tone = synth.bowedTone({ f0: 293.66, seconds: 1.5, attackSeconds: rise })
      const readings: number[] = []
      for (const lead of [0, 0.05, 0.3, 1]) {
        for (const noiseDbfs of [null, -70, -50]) {
          const start = Math.round(lead * RATE)
          const clip = new Float32Array(start + tone.length)
          clip.set(tone, start)
          if (noiseDbfs !== null) {
            const noise = synth.whiteNoise({ seconds: clip.length / RATE, rmsDbfs: noiseDbfs })
            for (let i = 0; i < clip.length; i++) clip[i] += noise[i]
          }
          readings.push(attackTime(clip, RATE)!.attackSeconds)
        }
      }
      // Under 5 ms between any two readings of the same note.
      expect(Math.max(...readings) - Math.min(...readings)).toBeLessThan(0.005)
      expect(Math.abs(readings[0] - 0.608 * rise)).toBeLessThan(0.005)
    }
  })

  it('rises out of a noise floor less than 40 dB below the note', () => {
    const note = synth.bowedTone({ f0: 440, seconds: 2, attackSeconds: 0.15, delaySeconds: 0.5 })
    const noise = synth.whiteNoise({ seconds: note.length / RATE, rmsDbfs: -45 })
    for (let i = 0; i < note.length; i++) note[i] += noise[i]
    const result = attackTime(note, RATE)!
    expect(result.onsetSeconds).toBeGreaterThan(0.5)
    expect(Math.abs(result.attackSeconds - 0.608 * 0.15)).toBeLessThan(0.005)
  })

  it('orders a quick-speaking note before a slow one', () => {
    const quick = synth.bowedTone({ f0: 147, seconds: 1.5, attackSeconds: 0.04 })
    const slow = synth.bowedTone({ f0: 147, seconds: 1.5, attackSeconds: 0.25 })
    expect(attackTime(quick, RATE)!.attackSeconds).toBeLessThan(
      attackTime(slow, RATE)!.attackSeconds,
    )
  })

  it('is null for silence', () => {
    expect(attackTime(new Float32Array(RATE), RATE)).toBeNull()
  })
})

describe('waveform peaks', () => {
  it('gives min and max per bucket over all channels, rounded to 4 decimals', () => {
    const left = new Float32Array([0.1, -0.5, 0.25, 0.123456, 0, 0])
    const right = new Float32Array([0, 0, -0.3, 0.9, 0, -0.00001])
    expect(waveformPeaks([left, right], 3)).toEqual({
      min: [-0.5, -0.3, 0],
      max: [0.1, 0.9, 0],
    })
  })

  it('gives 1000 buckets by default and never more than the samples', () => {
    const tone = synth.sine({ frequency: 100, seconds: 1 })
    const peaks = waveformPeaks([tone])
    expect(peaks.min).toHaveLength(1000)
    expect(Math.max(...peaks.max)).toBeLessThanOrEqual(1)
    expect(waveformPeaks([new Float32Array(10)]).max).toHaveLength(10)
  })
})
