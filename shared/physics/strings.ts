// Ideal and stiff string relations, SI units throughout (m, kg, N, Hz, Pa).

/** Mersenne–Taylor: f = (1/2L)·√(T/μ)  ⇒  T = μ·(2Lf)². */
export function tensionFromPitch(lengthM: number, frequencyHz: number, muKgPerM: number): number {
  return muKgPerM * (2 * lengthM * frequencyHz) ** 2
}

/** The mass per length that brings a string of this length to this pitch at this tension. */
export function massPerLengthForTension(
  lengthM: number,
  frequencyHz: number,
  tensionN: number,
): number {
  return tensionN / (2 * lengthM * frequencyHz) ** 2
}

export function frequencyFromTension(lengthM: number, tensionN: number, muKgPerM: number): number {
  return Math.sqrt(tensionN / muKgPerM) / (2 * lengthM)
}

/** Mass per length of a plain solid round string: μ = ρ·π·d²/4. */
export function massPerLengthOfPlainString(diameterM: number, densityKgPerM3: number): number {
  return (densityKgPerM3 * Math.PI * diameterM ** 2) / 4
}

/**
 * Inharmonicity coefficient of a plain stiff string, B = π³·E·d⁴ / (64·T·L²); partial n then
 * sounds at n·f₀·√(1 + B·n²).
 */
export function inharmonicity(
  diameterM: number,
  youngsModulusPa: number,
  tensionN: number,
  lengthM: number,
): number {
  return (Math.PI ** 3 * youngsModulusPa * diameterM ** 4) / (64 * tensionN * lengthM ** 2)
}

/** How far the nth partial of a stiff string sits above n·f₀, in cents. */
export function partialOffsetCents(b: number, n: number): number {
  return 1200 * Math.log2(Math.sqrt(1 + b * n * n))
}

/** Typical densities (kg/m³) and moduli (Pa) of core materials, common practice. */
export const MATERIALS = {
  steel: { density: 7850, modulus: 200e9 },
  gut: { density: 1300, modulus: 5e9 },
  nylon: { density: 1140, modulus: 3e9 },
} as const
