import { AudioError } from './errors.ts'

export const DEFAULT_TARGET_LUFS = -23
export const DEFAULT_CEILING_DBFS = -1

/**
 * Gain in dB that brings a clip to `targetLufs`, lowered if needed so its sample peak stays at
 * or below `ceilingDbfs`; a quiet clip with sharp peaks then ends below the target.
 */
export function renditionGain(
  loudnessLufs: number,
  peakDbfs: number,
  targetLufs = DEFAULT_TARGET_LUFS,
  ceilingDbfs = DEFAULT_CEILING_DBFS,
): number {
  if (!Number.isFinite(loudnessLufs) || !Number.isFinite(peakDbfs)) {
    throw new AudioError('silent', 'A silent clip cannot be brought to a loudness target.')
  }
  return Math.min(targetLufs - loudnessLufs, ceilingDbfs - peakDbfs)
}

export interface MatchedSetGains {
  /** Gain in dB per clip, in the order given. */
  gainsDb: number[]
  /** The loudness every clip of the set reaches. */
  targetLufs: number
}

/**
 * Gains for clips that will be compared with each other. They must stay equally loud, or
 * players hear level instead of string; so when any clip would peak above the ceiling, the
 * whole set's target comes down by the same amount instead of limiting that one clip.
 */
export function matchedSetGains(
  clips: ReadonlyArray<{ loudnessLufs: number; peakDbfs: number }>,
  targetLufs = DEFAULT_TARGET_LUFS,
  ceilingDbfs = DEFAULT_CEILING_DBFS,
): MatchedSetGains {
  let target = targetLufs
  for (const clip of clips) {
    if (!Number.isFinite(clip.loudnessLufs) || !Number.isFinite(clip.peakDbfs)) {
      throw new AudioError('silent', 'A silent clip cannot be level-matched.')
    }
    const overshoot = clip.peakDbfs + (targetLufs - clip.loudnessLufs) - ceilingDbfs
    if (overshoot > 0) target = Math.min(target, targetLufs - overshoot)
  }
  return { gainsDb: clips.map((clip) => target - clip.loudnessLufs), targetLufs: target }
}
