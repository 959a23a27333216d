/** A second-order section with a0 normalised to 1: y = b0·x + b1·x1 + b2·x2 − a1·y1 − a2·y2. */
export interface Biquad {
  b: readonly [number, number, number]
  a: readonly [number, number]
}

export interface KWeighting {
  /** Stage 1: the high shelf that models the acoustic effect of the head. */
  shelf: Biquad
  /** Stage 2: the RLB high-pass. */
  highPass: Biquad
}

/** ITU-R BS.1770-4, tables 1 and 2: the published coefficients at 48 kHz. */
export const K_WEIGHTING_48K: KWeighting = {
  shelf: {
    b: [1.53512485958697, -2.69169618940638, 1.19839281085285],
    a: [-1.69065929318241, 0.73248077421585],
  },
  highPass: {
    b: [1, -2, 1],
    a: [-1.99004745483398, 0.99007225036621],
  },
}

// Analog prototype of the two stages, fitted so that the bilinear transform at 48 kHz lands on
// the published coefficients; the standard only publishes the 48 kHz digital filter.
const SHELF_HZ = 1681.974450955533
const SHELF_GAIN_DB = 3.999843853973347
const SHELF_Q = 0.7071752369554196
const SHELF_BANDWIDTH_EXPONENT = 0.4996667741545416
const HIGH_PASS_HZ = 38.13547087602444
const HIGH_PASS_Q = 0.5003270373238773

/** The K-weighting for any sample rate, by the bilinear transform of the analog prototype. */
export function deriveKWeighting(sampleRate: number): KWeighting {
  let k = Math.tan((Math.PI * SHELF_HZ) / sampleRate)
  const vh = 10 ** (SHELF_GAIN_DB / 20)
  const vb = vh ** SHELF_BANDWIDTH_EXPONENT
  let a0 = 1 + k / SHELF_Q + k * k
  const shelf: Biquad = {
    b: [
      (vh + (vb * k) / SHELF_Q + k * k) / a0,
      (2 * (k * k - vh)) / a0,
      (vh - (vb * k) / SHELF_Q + k * k) / a0,
    ],
    a: [(2 * (k * k - 1)) / a0, (1 - k / SHELF_Q + k * k) / a0],
  }
  k = Math.tan((Math.PI * HIGH_PASS_HZ) / sampleRate)
  a0 = 1 + k / HIGH_PASS_Q + k * k
  const highPass: Biquad = {
    b: [1, -2, 1],
    a: [(2 * (k * k - 1)) / a0, (1 - k / HIGH_PASS_Q + k * k) / a0],
  }
  return { shelf, highPass }
}

/** Published values at 48 kHz, so results there match other meters to the last digit. */
export function kWeighting(sampleRate: number): KWeighting {
  return sampleRate === 48_000 ? K_WEIGHTING_48K : deriveKWeighting(sampleRate)
}

/** Gain in dB of a cascade of sections at one frequency, for checking a filter's shape. */
export function biquadGainDb(sections: readonly Biquad[], frequency: number, sampleRate: number) {
  const w = (2 * Math.PI * frequency) / sampleRate
  let magnitudeSquared = 1
  for (const { b, a } of sections) {
    const num = complexPoly(b[0], b[1], b[2], w)
    const den = complexPoly(1, a[0], a[1], w)
    magnitudeSquared *= (num.re ** 2 + num.im ** 2) / (den.re ** 2 + den.im ** 2)
  }
  return 10 * Math.log10(magnitudeSquared)
}

function complexPoly(c0: number, c1: number, c2: number, w: number) {
  return {
    re: c0 + c1 * Math.cos(w) + c2 * Math.cos(2 * w),
    im: -c1 * Math.sin(w) - c2 * Math.sin(2 * w),
  }
}
