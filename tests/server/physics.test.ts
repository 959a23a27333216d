import { describe, expect, it } from 'vitest'
import {
  frequencyFromTension,
  inharmonicity,
  massPerLengthForTension,
  massPerLengthOfPlainString,
  MATERIALS,
  tensionFromPitch,
} from '../../shared/physics/strings'

// A plain steel violin E: 0.26 mm, 7850 kg/m³, 328 mm vibrating length, tuned to 659.26 Hz.
const d = 0.26e-3
const L = 0.328
const f = 659.26

describe('string physics', () => {
  it('gives about 78 N for a plain steel violin E', () => {
    // Computed from f = (1/2L)·√(T/μ) (Mersenne–Taylor), REFERENCES "Decay and string physics".
    const mu = massPerLengthOfPlainString(d, MATERIALS.steel.density)
    expect(tensionFromPitch(L, f, mu)).toBeCloseTo(78, 0)
  })

  it('gives B ≈ 5.3e−5 for the same string with E = 200 GPa', () => {
    // B = π³·E·d⁴/(64·T·L²), Fletcher & Rossing, The Physics of Musical Instruments (computed).
    const mu = massPerLengthOfPlainString(d, MATERIALS.steel.density)
    const b = inharmonicity(d, 200e9, tensionFromPitch(L, f, mu), L)
    expect(b).toBeGreaterThan(5.2e-5)
    expect(b).toBeLessThan(5.4e-5)
  })

  it('adds 0.9% of tension when the pitch goes from 440 to 442 Hz', () => {
    // Tension scales with the square of frequency: (442/440)² = 1.00910 (computed).
    const mu = 0.6e-3
    const ratio = tensionFromPitch(L, 442, mu) / tensionFromPitch(L, 440, mu)
    expect(ratio).toBeCloseTo(1.0091, 4)
  })

  it('inverts: the mass per length for a tension gives back the pitch', () => {
    const mu = massPerLengthForTension(L, 440, 52)
    expect(frequencyFromTension(L, 52, mu)).toBeCloseTo(440, 9)
  })
})
