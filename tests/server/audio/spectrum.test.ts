import { describe, expect, it } from 'vitest'
import { estimateF0, spectralCentroid, synth, yinFrame } from '../../../server/audio/index.ts'

const RATE = 48_000

describe('spectral centroid', () => {
  it('equals the frequency of a pure tone', () => {
    for (const frequency of [196, 1000, 1234.5, 5000]) {
      const tone = synth.sine({ frequency, seconds: 2, peakDbfs: -6 })
      const centroid = spectralCentroid(tone, RATE)!
      expect(Math.abs(centroid - frequency) / frequency).toBeLessThan(0.005)
    }
  })

  it('is the mean of two equal-amplitude tones (computed: (500 + 2500)/2)', () => {
    const mix = synth.sine({ frequency: 500, seconds: 2, peakDbfs: -6 })
    const high = synth.sine({ frequency: 2500, seconds: 2, peakDbfs: -6 })
    for (let i = 0; i < mix.length; i++) mix[i] += high[i]
    expect(spectralCentroid(mix, RATE)).toBeCloseTo(1500, -1)
  })

  it('weights by power: tones of amplitude 1 and 0.5 give (500 + 0.25·2500)/1.25 = 900 Hz', () => {
    // Computed from the definition in the README; magnitude weighting would give 1,167 Hz.
    const mix = synth.sine({ frequency: 500, seconds: 2, peakDbfs: -6 })
    const high = synth.sine({ frequency: 2500, seconds: 2, peakDbfs: -12.0206 })
    for (let i = 0; i < mix.length; i++) mix[i] += high[i]
    expect(Math.abs(spectralCentroid(mix, RATE)! - 900)).toBeLessThan(5)
  })

  it('moves by under 5% when −60 dBFS white noise is added to a pluck or a bowed note', () => {
    const notes = [
      synth.pluckedNote({ f0: 196, t60: 3, seconds: 4, delaySeconds: 0.2 }),
      synth.pluckedNote({ f0: 98, t60: 6, seconds: 4 }),
      synth.pluckedNote({ f0: 659.26, t60: 0.8, seconds: 3, delaySeconds: 0.5 }),
      synth.bowedTone({ f0: 196, seconds: 3, attackSeconds: 0.1 }),
    ]
    for (const clean of notes) {
      const noisy = clean.slice()
      const noise = synth.whiteNoise({ seconds: clean.length / RATE, rmsDbfs: -60, seed: 5 })
      for (let i = 0; i < noisy.length; i++) noisy[i] += noise[i]
      const before = spectralCentroid(clean, RATE)!
      expect(Math.abs(spectralCentroid(noisy, RATE)! / before - 1)).toBeLessThan(0.05)
    }
  })

  it('ignores the silent parts of a clip', () => {
    const tone = synth.sine({ frequency: 800, seconds: 1, peakDbfs: -12 })
    // 50 ms fades, so the edges add no clicks of their own.
    const fade = 2400
    for (let i = 0; i < fade; i++) {
      const gain = 0.5 - 0.5 * Math.cos((Math.PI * i) / fade)
      tone[i] *= gain
      tone[tone.length - 1 - i] *= gain
    }
    const padded = new Float32Array(tone.length * 3)
    padded.set(tone, tone.length)
    for (let i = 0; i < padded.length; i += 97) padded[i] += 1e-6
    expect(Math.abs(spectralCentroid(padded, RATE)! - 800)).toBeLessThan(4)
  })

  it('is higher for a brighter tone (more upper harmonics)', () => {
    const dark = synth.harmonicSum(220, [1, 0.3, 0.1], 1)
    const bright = synth.harmonicSum(220, [1, 0.8, 0.7, 0.6, 0.5, 0.4], 1)
    expect(spectralCentroid(bright, RATE)!).toBeGreaterThan(spectralCentroid(dark, RATE)!)
  })

  it('is null for silence', () => {
    expect(spectralCentroid(new Float32Array(RATE), RATE)).toBeNull()
  })
})

describe('fundamental frequency', () => {
  // Open strings and the bass's low E, by the equal-tempered scale on A4 = 440 Hz (ISO 16).
  it.each([41.2, 65.41, 196, 293.66, 440, 659.26, 1760])('finds a %f Hz sine', (frequency) => {
    const estimate = estimateF0(synth.sine({ frequency, seconds: 1, peakDbfs: -6 }), RATE)!
    expect(Math.abs(estimate.f0Hz - frequency) / frequency).toBeLessThan(0.002)
    expect(estimate.aperiodicity).toBeLessThan(0.05)
  })

  it('finds the fundamental of a harmonic tone whose fundamental is nearly missing', () => {
    // Fundamental 34 dB below the second harmonic; the period is still that of 110 Hz.
    const tone = synth.harmonicSum(110, [0.02, 1, 0.7, 0.5, 0.4, 0.3], 1)
    expect(estimateF0(tone, RATE)!.f0Hz).toBeCloseTo(110, 0)
    const missing = synth.harmonicSum(147, [0, 1, 0.8, 0.6, 0.4], 1)
    expect(estimateF0(missing, RATE)!.f0Hz).toBeCloseTo(147, 0)
  })

  it('finds the fundamental of a bowed-like tone at 44.1 kHz', () => {
    const tone = synth.bowedTone({
      f0: 329.63,
      seconds: 1.5,
      attackSeconds: 0.2,
      sampleRate: 44_100,
    })
    expect(estimateF0(tone, 44_100)!.f0Hz).toBeCloseTo(329.63, 0)
  })

  it('reports noise as aperiodic or unpitched', () => {
    const noise = synth.whiteNoise({ seconds: 1, rmsDbfs: -20 })
    const frame = yinFrame(noise, 0, RATE)
    expect(frame === null || frame.aperiodicity > 0.3).toBe(true)
    expect(estimateF0(noise, RATE)).toBeNull()
  })
})
