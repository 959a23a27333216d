/**
 * Seeded randomness for order designs. A session stores only its seed, so every draw here must
 * be reproducible from it on any machine: no Math.random, no clock.
 */
export type Seed = string | number

export interface Random {
  /** Uniform in [0, 1). */
  next(): number
  /** Uniform integer in [0, n). */
  int(n: number): number
}

/**
 * 32-bit FNV-1a over the UTF-16 code units, then the murmur3 finaliser: FNV alone leaves
 * seeds that differ in the last character close together, and mulberry32 started from close
 * states gives visibly related first draws.
 */
export function hashSeed(seed: Seed): number {
  const text = String(seed)
  let h = 0x811c9dc5
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i)
    h = Math.imul(h, 0x01000193)
  }
  h ^= h >>> 16
  h = Math.imul(h, 0x85ebca6b)
  h ^= h >>> 13
  h = Math.imul(h, 0xc2b2ae35)
  h ^= h >>> 16
  return h >>> 0
}

/** mulberry32: tiny, fast and good enough for dealing orders; not for anything secret. */
export function createRandom(seed: Seed): Random {
  let state = hashSeed(seed)
  const next = () => {
    state = (state + 0x6d2b79f5) >>> 0
    let t = state
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
  const int = (n: number) => Math.floor(next() * n)
  return { next, int }
}

/**
 * A separate stream per purpose, so adding a draw to one part of a plan (say, more blind
 * codes) does not shift every later draw and change orders that players already have.
 */
export function deriveSeed(seed: Seed, label: string): string {
  return `${String(seed)}/${label}`
}

/** Fisher–Yates on a copy; the input is left alone. */
export function shuffle<T>(items: readonly T[], random: Random): T[] {
  const out = [...items]
  for (let i = out.length - 1; i > 0; i--) {
    const j = random.int(i + 1)
    ;[out[i], out[j]] = [out[j], out[i]]
  }
  return out
}
