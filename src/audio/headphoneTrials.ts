// The three-tone headphone check: two tones are alike, one is 6 dB quieter and one is played in
// antiphase between the ears. Over loudspeakers the antiphase tone partly cancels in the air and
// sounds quietest; over headphones it does not, so only a listener on headphones reliably picks
// the truly quieter tone.

// Which tones each trial plays, in which order, is dealt by the server (it also scores the
// answers); the rules and the dealing live in the shared module, the sound is made here.
import type { ToneKind } from '@shared/headphoneCheck'

export {
  HEADPHONE_PASS,
  headphonePassed,
  headphoneTrials,
  seededRandom,
  type HeadphoneTrial,
  type ToneKind,
} from '@shared/headphoneCheck'

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
