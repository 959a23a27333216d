import { open } from 'node:fs/promises'
import { FLACDecoder, type FLACDecodedAudio } from '@wasm-audio-decoders/flac'
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
 * One array per channel, filled part by part. When the promised length is believable it is
 * allocated once; otherwise (unknown, or far more than the file's size could carry) the arrays
 * grow by doubling, never past the promise, so a small file claiming hours costs only what it
 * really holds.
 */
class ChannelSink {
  channels: Float32Array[] = []
  frames = 0
  private capacity: number

  constructor(
    private readonly promised: number,
    believable: boolean,
  ) {
    this.capacity = believable ? promised : Math.min(promised || Infinity, GROWTH_START)
  }

  push(part: readonly Float32Array[], frames: number) {
    if (this.channels.length === 0) {
      this.capacity = Math.max(this.capacity, frames)
      this.channels = part.map(() => new Float32Array(this.capacity))
    }
    const needed = this.frames + frames
    if (needed > this.capacity) {
      const doubled = Math.max(needed, this.capacity * 2)
      this.capacity = this.promised >= needed ? Math.min(doubled, this.promised) : doubled
      this.channels = this.channels.map((old) => {
        const grown = new Float32Array(this.capacity)
        grown.set(old.subarray(0, this.frames))
        return grown
      })
    }
    this.channels.forEach((out, c) => out.set(part[c].subarray(0, frames), this.frames))
    this.frames = needed
  }
}

// Frames first allocated when the length is unknown or not believable.
const GROWTH_START = 1 << 20
// Real recordings decode to a few times their FLAC size; a promise of more than this many
// bytes of samples per byte of file is grown into rather than taken on trust.
const BELIEVABLE_RATIO = 16

// Compressed bytes handed to the decoder at a time: its output per call stays small.
const FLAC_CHUNK = 1024 * 1024

/**
 * Decodes FLAC from chunks of the file, in order. The decoder quietly returns whatever it could
 * read, so a short result is compared with the promised length and refused: a clip cut off
 * mid-note would otherwise be measured as if it were complete. Samples go straight into one
 * array per channel, so nothing but those arrays grows with the length of the recording; a file
 * that turns out longer than the limit is refused as soon as it passes it.
 */
async function decodeFlacChunks(
  info: StreamInfo,
  fileBytes: number,
  chunks: AsyncIterable<Uint8Array> | Iterable<Uint8Array>,
  options: DecodeOptions,
): Promise<DecodedAudio> {
  const maxSeconds = options.maxSeconds ?? Infinity
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
    const promisedBytes = info.totalSamples * info.channels * 4
    const sink = new ChannelSink(info.totalSamples, promisedBytes <= fileBytes * BELIEVABLE_RATIO)
    let errors = 0
    let sampleRate = 0
    let bitDepth = 0
    const take = (part: FLACDecodedAudio) => {
      errors += part.errors.length
      if (part.samplesDecoded === 0) return
      sampleRate = part.sampleRate || sampleRate
      bitDepth = part.bitDepth || bitDepth
      sink.push(part.channelData, part.samplesDecoded)
      if (sink.frames / info.sampleRate > maxSeconds) {
        throw new AudioError('too_long', `The recording is longer than ${maxSeconds} s.`)
      }
    }
    for await (const chunk of chunks) take(await decoder.decode(chunk))
    take(await decoder.flush())

    const frames = sink.frames
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
    if (errors > 0) {
      throw new AudioError('corrupt', `The FLAC has ${errors} damaged frames.`)
    }
    bitDepth ||= info.bitDepth
    // The decoder divides by 2^(bits−1) − 1; WAV and every meter use 2^(bits−1), so rescale to
    // give the same numbers for the same integer samples whichever container they came in.
    const full = 2 ** (bitDepth - 1)
    const rescale = (full - 1) / full
    const channels = sink.channels.map((channel) => {
      const out = channel.subarray(0, frames)
      for (let i = 0; i < frames; i++) out[i] *= rescale
      return out
    })
    return {
      container: 'flac',
      sampleRate: sampleRate || info.sampleRate,
      channels,
      bitDepth,
      format: 'pcm',
    }
  } finally {
    decoder.free()
  }
}

function* slices(bytes: Uint8Array): Generator<Uint8Array> {
  for (let at = 0; at < bytes.length; at += FLAC_CHUNK) yield bytes.subarray(at, at + FLAC_CHUNK)
}

/** Decodes a whole FLAC file held in memory. */
export async function decodeFlac(
  bytes: Uint8Array,
  options: DecodeOptions = {},
): Promise<DecodedAudio> {
  return decodeFlacChunks(readFlacStreamInfo(bytes), bytes.length, slices(bytes), options)
}

/** Decodes a FLAC file from disk, read in chunks of about 1 MB: the file is never held whole. */
export async function decodeFlacFile(
  path: string,
  options: DecodeOptions = {},
): Promise<DecodedAudio> {
  const file = await open(path, 'r')
  try {
    const head = new Uint8Array(8 + 34)
    const { bytesRead } = await file.read(head, 0, head.length, 0)
    const info = readFlacStreamInfo(head.subarray(0, bytesRead))
    const { size } = await file.stat()
    async function* chunks() {
      for (let position = 0; ;) {
        // A fresh buffer each time: the decoder's parser may keep a chunk until its frame ends.
        const chunk = new Uint8Array(FLAC_CHUNK)
        const { bytesRead } = await file.read(chunk, 0, chunk.length, position)
        if (bytesRead === 0) return
        position += bytesRead
        yield chunk.subarray(0, bytesRead)
      }
    }
    return await decodeFlacChunks(info, size, chunks(), options)
  } finally {
    await file.close()
  }
}
