import { FLACDecoder } from '@wasm-audio-decoders/flac'
import { AudioError } from './errors.ts'
import type { DecodedAudio, DecodeOptions } from './types.ts'

interface StreamInfo {
  sampleRate: number
  channels: number
  bitDepth: number
  /** 0 means the encoder did not know the length in advance. */
  totalSamples: number
}

/**
 * STREAMINFO is read by hand so that length limits and truncation can be judged against what
 * the file promises, before and after the decoder runs.
 */
export function readFlacStreamInfo(bytes: Uint8Array): StreamInfo {
  if (bytes.length < 8 + 34) throw new AudioError('truncated', 'The FLAC header is incomplete.')
  const blockType = bytes[4] & 0x7f
  const length = (bytes[5] << 16) | (bytes[6] << 8) | bytes[7]
  if (blockType !== 0 || length < 34) {
    throw new AudioError('corrupt', 'The FLAC file does not start with its stream description.')
  }
  const b = bytes.subarray(8, 8 + 34)
  const sampleRate = (b[10] << 12) | (b[11] << 4) | (b[12] >> 4)
  const channels = ((b[12] >> 1) & 0x07) + 1
  const bitDepth = (((b[12] & 0x01) << 4) | (b[13] >> 4)) + 1
  const low32 = ((b[14] << 24) | (b[15] << 16) | (b[16] << 8) | b[17]) >>> 0
  const totalSamples = (b[13] & 0x0f) * 2 ** 32 + low32
  if (sampleRate === 0) throw new AudioError('corrupt', 'The FLAC sample rate is zero.')
  return { sampleRate, channels, bitDepth, totalSamples }
}

/**
 * Decodes a whole FLAC file. The decoder quietly returns whatever it could read, so a short
 * result is compared with the promised length and refused: a clip cut off mid-note would
 * otherwise be measured as if it were complete.
 */
export async function decodeFlac(
  bytes: Uint8Array,
  options: DecodeOptions = {},
): Promise<DecodedAudio> {
  const maxSeconds = options.maxSeconds ?? Infinity
  const info = readFlacStreamInfo(bytes)
  if (info.totalSamples / info.sampleRate > maxSeconds) {
    throw new AudioError(
      'too_long',
      'The recording lasts ' +
        `${Math.round(info.totalSamples / info.sampleRate)} s; the limit is ${maxSeconds} s.`,
    )
  }
  const decoder = new FLACDecoder()
  try {
    await decoder.ready
    const decoded = await decoder.decodeFile(bytes)
    const frames = decoded.samplesDecoded
    if (frames === 0) {
      if (info.totalSamples > 0) throw new AudioError('truncated', 'The FLAC audio is cut off.')
      throw new AudioError('empty', 'The FLAC holds no samples.')
    }
    if (info.totalSamples > 0 && frames < info.totalSamples) {
      throw new AudioError(
        'truncated',
        `The FLAC promises ${info.totalSamples} samples per channel but holds ${frames}.`,
      )
    }
    if (decoded.errors.length > 0) {
      throw new AudioError('corrupt', `The FLAC has ${decoded.errors.length} damaged frames.`)
    }
    if (frames / info.sampleRate > maxSeconds) {
      throw new AudioError('too_long', `The recording is longer than ${maxSeconds} s.`)
    }
    const bitDepth = decoded.bitDepth || info.bitDepth
    // The decoder divides by 2^(bits−1) − 1; WAV and every meter use 2^(bits−1), so rescale to
    // give the same numbers for the same integer samples whichever container they came in.
    const full = 2 ** (bitDepth - 1)
    const rescale = (full - 1) / full
    const channels = decoded.channelData.map((channel) => {
      const out = channel.subarray(0, frames)
      for (let i = 0; i < frames; i++) out[i] *= rescale
      return out
    })
    return {
      container: 'flac',
      sampleRate: decoded.sampleRate || info.sampleRate,
      channels,
      bitDepth,
      format: 'pcm',
    }
  } finally {
    decoder.free()
  }
}
