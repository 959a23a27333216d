import { describe, expect, it } from 'vitest'
import {
  bandPass,
  decayTime,
  lossFactor,
  qualityFactor,
  schroederCurve,
  synth,
} from '../../../server/audio/index.ts'

const RATE = 48_000

// ISO 3382-1: Schroeder backward integration, T20 over −5…−25 dB and T30 over −5…−35 dB,
// extrapolated to 60 dB. A synthetic exponential decay with T60 = 1.000 s must read 1.000 (±1 %).
describe('decay time', () => {
  it('reads T60 = 1.000 s from a clean exponentially decaying sine', () => {
    const ring = synth.exponentialDecay({ seconds: 3, t60: 1, frequency: 440 })
    const result = decayTime(ring, RATE)
    expect(result?.method).toBe('T30')
    expect(result?.t60Seconds).toBeCloseTo(1, 2)
    expect(Math.abs(result!.t60Seconds - 1)).toBeLessThanOrEqual(0.01)
    expect(result!.fitCorrelation).toBeLessThan(-0.999)
  })

  it('reads T60 = 1.000 s (±1 %) from decaying noise over a noise floor', () => {
    for (const noiseFloorDbfs of [-75, -65]) {
      const ring = synth.exponentialDecay({ seconds: 3, t60: 1, noiseFloorDbfs })
      const result = decayTime(ring, RATE)
      expect(Math.abs(result!.t60Seconds - 1)).toBeLessThanOrEqual(0.01)
    }
  })

  it('falls back to T20 when the floor is between 35 and 45 dB down, still within 1 %', () => {
    const ring = synth.exponentialDecay({ seconds: 3, t60: 1, frequency: 440, noiseFloorDbfs: -45 })
    const result = decayTime(ring, RATE)
    expect(result?.method).toBe('T20')
    expect(Math.abs(result!.t60Seconds - 1)).toBeLessThanOrEqual(0.01)
  })

  it('refuses to guess when the noise floor leaves less than 35 dB of decay', () => {
    const ring = synth.exponentialDecay({ seconds: 3, t60: 1, frequency: 440, noiseFloorDbfs: -30 })
    expect(decayTime(ring, RATE)).toBeNull()
  })

  it('measures the fundamental of a plucked note, not its faster upper partials', () => {
    const note = synth.pluckedNote({
      f0: 196,
      t60: 4,
      seconds: 6,
      delaySeconds: 0.3,
      noiseFloorDbfs: -80,
    })
    const result = decayTime(note, RATE, { band: [196 / 1.26, 196 * 1.26] })
    expect(Math.abs(result!.t60Seconds - 4) / 4).toBeLessThanOrEqual(0.01)
    expect(result!.startSeconds).toBeGreaterThanOrEqual(0.3)
  })

  it('starts the Schroeder curve at 0 dB and never lets it rise', () => {
    const ring = synth.exponentialDecay({ seconds: 1, t60: 0.5 })
    const energy = new Float64Array(1000)
    for (let i = 0; i < ring.length; i++) energy[Math.floor(i / 48)] += ring[i] ** 2
    const curve = schroederCurve(energy)
    expect(curve[0]).toBe(0)
    for (let k = 1; k < curve.length; k++) expect(curve[k]).toBeLessThanOrEqual(curve[k - 1])
  })
})

describe('band-pass used around f0', () => {
  const rms = (x: Float32Array) => Math.sqrt(x.reduce((sum, v) => sum + v * v, 0) / x.length)

  it('passes the centre of the band and holds the octave above well down', () => {
    const band = [196 / 1.26, 196 * 1.26] as const
    const centre = synth.sine({ frequency: 196, seconds: 1 })
    const octave = synth.sine({ frequency: 392, seconds: 1 })
    const settled = (x: Float32Array) => x.subarray(RATE / 2)
    expect(rms(settled(bandPass(centre, RATE, band))) / rms(settled(centre))).toBeCloseTo(1, 2)
    const octaveDb = 20 * Math.log10(rms(settled(bandPass(octave, RATE, band))) / rms(octave))
    expect(octaveDb).toBeLessThan(-15)
  })
})

describe('loss factor and Q', () => {
  it('gives η ≈ 0.0010 and Q ≈ 1000 for f = 440 Hz, T60 = 5 s', () => {
    // Craik (1996) eq. 1.19: η = 2.2/(f·T60); Q = π·f·T60/6.908 (as in REFERENCES.md).
    expect(lossFactor(440, 5)).toBeCloseTo(0.001, 5)
    expect(qualityFactor(440, 5)).toBeCloseTo(1000, -1)
    expect(lossFactor(440, 5) * qualityFactor(440, 5)).toBeCloseTo(1, 12)
  })

  it('halves when the decay time doubles (computed)', () => {
    expect(lossFactor(196, 8)).toBeCloseTo(lossFactor(196, 4) / 2, 12)
  })
})
