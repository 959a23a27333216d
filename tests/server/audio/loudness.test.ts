import { describe, expect, it } from 'vitest'
import {
  biquadGainDb,
  deriveKWeighting,
  integratedLoudness,
  K_WEIGHTING_48K,
  kWeighting,
  synth,
} from '../../../server/audio/index.ts'

const RATE = 48_000

describe('K-weighting', () => {
  // ITU-R BS.1770-4, tables 1 and 2 (48 kHz); the values as listed in REFERENCES.md.
  const published = {
    shelf: {
      b: [1.53512485958697, -2.69169618940638, 1.19839281085285],
      a: [-1.69065929318241, 0.73248077421585],
    },
    highPass: { b: [1, -2, 1], a: [-1.99004745483398, 0.99007225036621] },
  }

  it('uses the published coefficients at 48 kHz', () => {
    expect(kWeighting(48_000)).toEqual(published)
    expect(K_WEIGHTING_48K).toEqual(published)
  })

  it('derives the same coefficients at 48 kHz from the analog prototype', () => {
    const derived = deriveKWeighting(48_000)
    for (const stage of ['shelf', 'highPass'] as const) {
      derived[stage].b.forEach((v, i) => expect(v).toBeCloseTo(published[stage].b[i], 12))
      derived[stage].a.forEach((v, i) => expect(v).toBeCloseTo(published[stage].a[i], 12))
    }
  })

  it('keeps the same response shape at 44.1 kHz', () => {
    const at48 = [K_WEIGHTING_48K.shelf, K_WEIGHTING_48K.highPass]
    const k44 = kWeighting(44_100)
    const at44 = [k44.shelf, k44.highPass]
    // The published filter passes 997 Hz at +0.691 dB: the origin of BS.1770's −0.691 constant.
    expect(biquadGainDb(at48, 997, 48_000)).toBeCloseTo(0.691, 3)
    for (const f of [30, 100, 997, 2000, 8000, 15000]) {
      expect(biquadGainDb(at44, f, 44_100)).toBeCloseTo(biquadGainDb(at48, f, 48_000), 1)
    }
  })
})

describe('integrated loudness', () => {
  it('reads a 0 dBFS 997 Hz sine in one channel as −3.01 LKFS', () => {
    // ITU-R BS.1770-4 (the note after the loudness formula; the wording is quoted from memory
    // through REFERENCES.md): a 0 dB FS 997 Hz sine in the left, centre or right channel reads
    // −3.01 LKFS.
    const tone = synth.sine({ frequency: 997, seconds: 5, sampleRate: RATE })
    expect(integratedLoudness([tone, new Float32Array(tone.length)], RATE)).toBeCloseTo(-3.01, 2)
    expect(integratedLoudness([tone], RATE)).toBeCloseTo(-3.01, 2)
    const at44 = synth.sine({ frequency: 997, seconds: 5, sampleRate: 44_100 })
    expect(integratedLoudness([at44], 44_100)).toBeCloseTo(-3.01, 2)
  })

  // EBU Tech 3341 (minimum requirements test signals), cases 1–4: stereo 1 kHz sine in both
  // channels, expected −23.0 ± 0.1 LUFS (−33.0 for case 2). Generated once at 48 kHz.
  const stereo = (mono: Float32Array) => [mono, mono]

  it('EBU Tech 3341 case 1: −23 dBFS for 20 s reads −23.0 LUFS', () => {
    const tone = synth.sine({ frequency: 1000, seconds: 20, peakDbfs: -23 })
    expect(Math.abs(integratedLoudness(stereo(tone), RATE) + 23)).toBeLessThanOrEqual(0.1)
  })

  it('EBU Tech 3341 case 2: −33 dBFS for 20 s reads −33.0 LUFS', () => {
    const tone = synth.sine({ frequency: 1000, seconds: 20, peakDbfs: -33 })
    expect(Math.abs(integratedLoudness(stereo(tone), RATE) + 33)).toBeLessThanOrEqual(0.1)
  })

  it('EBU Tech 3341 case 3: −36/−23/−36 dBFS for 10/60/10 s reads −23.0 (relative gate)', () => {
    const tone = synth.steppedSine({
      frequency: 1000,
      steps: [
        { seconds: 10, peakDbfs: -36 },
        { seconds: 60, peakDbfs: -23 },
        { seconds: 10, peakDbfs: -36 },
      ],
    })
    expect(Math.abs(integratedLoudness(stereo(tone), RATE) + 23)).toBeLessThanOrEqual(0.1)
  })

  it('EBU Tech 3341 case 4: −72/−36/−23/−36/−72 dBFS reads −23.0 (absolute gate)', () => {
    const tone = synth.steppedSine({
      frequency: 1000,
      steps: [
        { seconds: 10, peakDbfs: -72 },
        { seconds: 10, peakDbfs: -36 },
        { seconds: 60, peakDbfs: -23 },
        { seconds: 10, peakDbfs: -36 },
        { seconds: 10, peakDbfs: -72 },
      ],
    })
    expect(Math.abs(integratedLoudness(stereo(tone), RATE) + 23)).toBeLessThanOrEqual(0.1)
  })

  it('gives −Infinity for silence and for clips shorter than one 400 ms block', () => {
    expect(integratedLoudness([new Float32Array(RATE)], RATE)).toBe(-Infinity)
    const short = synth.sine({ frequency: 1000, seconds: 0.39 })
    expect(integratedLoudness([short], RATE)).toBe(-Infinity)
  })

  it('rises by 6.02 LU when the level doubles (computed: 20·log10 2)', () => {
    const quiet = synth.sine({ frequency: 440, seconds: 3, peakDbfs: -20 })
    const loud = quiet.map((v) => v * 2)
    const difference = integratedLoudness([loud], RATE) - integratedLoudness([quiet], RATE)
    expect(difference).toBeCloseTo(20 * Math.log10(2), 3)
  })
})
