// The three-tone headphone check: two tones are alike, one is 6 dB quieter and one is played in
// antiphase between the ears. Over loudspeakers the antiphase tone partly cancels in the air and
// sounds quietest; over headphones it does not, so only a listener on headphones reliably picks
// the truly quieter tone.

/**
 * The pass mark, 5 of 6 (Woods et al. 2017). The same as HEADPHONE_PASS in the shared contract,
 * written out here because importing that module would bring the validation library into the
 * player's page; a unit test keeps the two equal.
 */
export const HEADPHONE_PASS = { correct: 5, trials: 6 } as const

export type ToneKind = 'reference' | 'antiphase' | 'quiet'

export interface HeadphoneTrial {
  tones: [ToneKind, ToneKind, ToneKind]
  /** Index (0–2) of the quieter in-phase tone: the right answer. */
  answer: number
}

const ORDERS: [ToneKind, ToneKind, ToneKind][] = [
  ['reference', 'antiphase', 'quiet'],
  ['reference', 'quiet', 'antiphase'],
  ['antiphase', 'reference', 'quiet'],
  ['antiphase', 'quiet', 'reference'],
  ['quiet', 'reference', 'antiphase'],
  ['quiet', 'antiphase', 'reference'],
]

/** A small seeded generator, so a check can be replayed exactly in tests. */
export function seededRandom(seed: number): () => number {
  let s = seed >>> 0
  return () => {
    s = (s + 0x6d2b79f5) >>> 0
    let t = s
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

/**
 * Six trials that use every order of the three tones once, shuffled: the quiet tone is in each
 * position equally often, so a listener with a habit ("always the last") gains nothing.
 */
export function headphoneTrials(
  random: () => number = Math.random,
  count: number = HEADPHONE_PASS.trials,
): HeadphoneTrial[] {
  const trials: HeadphoneTrial[] = []
  while (trials.length < count) {
    const block = ORDERS.slice()
    for (let i = block.length - 1; i > 0; i--) {
      const j = Math.floor(random() * (i + 1))
      ;[block[i], block[j]] = [block[j], block[i]]
    }
    for (const tones of block) {
      if (trials.length < count) trials.push({ tones, answer: tones.indexOf('quiet') })
    }
  }
  return trials
}

export function headphonePassed(correct: number, trials: number): boolean {
  return trials >= HEADPHONE_PASS.trials && correct >= HEADPHONE_PASS.correct
}

export const TONE = {
  frequency: 200,
  seconds: 1,
  rampSeconds: 0.1,
  gapSeconds: 0.5,
  /** About −20 dBFS: quiet enough before the player has set a level. */
  amplitude: 0.1,
  quietDb: -6,
} as const

/** Left and right samples of the three tones of one trial, one after the other. */
export function toneSamples(
  tones: readonly ToneKind[],
  sampleRate: number,
): [Float32Array<ArrayBuffer>, Float32Array<ArrayBuffer>] {
  const toneLen = Math.round(TONE.seconds * sampleRate)
  const gapLen = Math.round(TONE.gapSeconds * sampleRate)
  const rampLen = Math.round(TONE.rampSeconds * sampleRate)
  const total = tones.length * toneLen + (tones.length - 1) * gapLen
  const left = new Float32Array(total)
  const right = new Float32Array(total)
  tones.forEach((kind, n) => {
    const gain = TONE.amplitude * (kind === 'quiet' ? 10 ** (TONE.quietDb / 20) : 1)
    const sign = kind === 'antiphase' ? -1 : 1
    const offset = n * (toneLen + gapLen)
    for (let i = 0; i < toneLen; i++) {
      const edge = Math.min(i, toneLen - 1 - i)
      const env = edge < rampLen ? 0.5 - 0.5 * Math.cos((Math.PI * edge) / rampLen) : 1
      const v = gain * env * Math.sin((2 * Math.PI * TONE.frequency * i) / sampleRate)
      left[offset + i] = v
      right[offset + i] = sign * v
    }
  })
  return [left, right]
}
