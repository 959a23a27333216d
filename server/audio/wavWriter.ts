import { dbToGain } from './level.ts'
import { encodeWav } from './wavEncoder.ts'

export interface RenditionOptions {
  bitDepth: 16 | 24
  gainDb: number
}

/**
 * A blind rendition: a new file holding only the format and data chunks, so nothing the
 * original carried (titles, comments, recorder and software names, dates) can reveal a recipe.
 * The gain is applied in floating point and the result rounded without dither, so the same clip
 * always renders to the same bytes.
 */
export function writeRenditionWav(
  channels: readonly Float32Array[],
  sampleRate: number,
  options: RenditionOptions,
): Uint8Array {
  return encodeWav(channels, sampleRate, {
    bitDepth: options.bitDepth,
    format: 'pcm',
    gain: dbToGain(options.gainDb),
  })
}
