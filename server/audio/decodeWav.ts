import { readSync } from 'node:fs'
import { open } from 'node:fs/promises'
import { AudioError } from './errors.ts'
import type { DecodedAudio, DecodeOptions, SampleFormat } from './types.ts'

const WAVE_FORMAT_PCM = 0x0001
const WAVE_FORMAT_IEEE_FLOAT = 0x0003
const WAVE_FORMAT_EXTENSIBLE = 0xfffe
const MAX_CHANNELS = 32
const MAX_SAMPLE_RATE = 768_000
// RF64 writes this in every 32-bit size field whose real value lives in the ds64 chunk.
const SIZE_IN_DS64 = 0xffffffff

interface FmtChunk {
  format: SampleFormat
  channels: number
  sampleRate: number
  containerBits: number
  validBits: number
  blockAlign: number
}

function chunkId(view: DataView, offset: number): string {
  return String.fromCharCode(
    view.getUint8(offset),
    view.getUint8(offset + 1),
    view.getUint8(offset + 2),
    view.getUint8(offset + 3),
  )
}

function readFmt(view: DataView, offset: number, size: number): FmtChunk {
  if (size < 16) throw new AudioError('corrupt', 'The format chunk is too short.')
  let tag = view.getUint16(offset, true)
  const channels = view.getUint16(offset + 2, true)
  const sampleRate = view.getUint32(offset + 4, true)
  const blockAlign = view.getUint16(offset + 12, true)
  const containerBits = view.getUint16(offset + 14, true)
  let validBits = containerBits
  if (tag === WAVE_FORMAT_EXTENSIBLE) {
    if (size < 40) throw new AudioError('corrupt', 'The extensible format chunk is too short.')
    validBits = view.getUint16(offset + 18, true) || containerBits
    // The sub-format GUID starts with the plain format tag; the remaining 14 bytes are fixed.
    tag = view.getUint16(offset + 24, true)
  }
  let format: SampleFormat
  if (tag === WAVE_FORMAT_PCM && [8, 16, 24, 32].includes(containerBits)) format = 'pcm'
  else if (tag === WAVE_FORMAT_IEEE_FLOAT && [32, 64].includes(containerBits)) format = 'float'
  else {
    throw new AudioError(
      'unsupported_format',
      `WAV format ${tag} at ${containerBits} bits is not supported; use PCM or 32-bit float.`,
    )
  }
  if (channels < 1 || channels > MAX_CHANNELS) {
    throw new AudioError('unsupported_format', `A WAV with ${channels} channels is not supported.`)
  }
  if (sampleRate < 1 || sampleRate > MAX_SAMPLE_RATE) {
    throw new AudioError('corrupt', `The sample rate ${sampleRate} Hz is not plausible.`)
  }
  if (blockAlign !== channels * (containerBits / 8)) {
    throw new AudioError('corrupt', 'The WAV block size does not match its channels and bits.')
  }
  if (validBits > containerBits) validBits = containerBits
  return { format, channels, sampleRate, containerBits, validBits, blockAlign }
}

/**
 * Samples of `frames` whole frames into `channels`, starting at frame `at` of each: the data of
 * a file can arrive in blocks, each written where it belongs, so no block outlives its turn.
 */
function deinterleave(
  bytes: Uint8Array,
  fmt: FmtChunk,
  frames: number,
  channels: Float32Array[],
  at = 0,
): void {
  const { containerBits, format } = fmt
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  // One tight loop per sample layout: this is the hot path for every upload.
  for (let c = 0; c < channels.length; c++) {
    const out = channels[c].subarray(at, at + frames)
    const step = fmt.blockAlign
    let p = c * (containerBits / 8)
    if (format === 'float' && containerBits === 32) {
      for (let i = 0; i < frames; i++, p += step) out[i] = view.getFloat32(p, true)
    } else if (format === 'float') {
      for (let i = 0; i < frames; i++, p += step) out[i] = view.getFloat64(p, true)
    } else if (containerBits === 16) {
      for (let i = 0; i < frames; i++, p += step) out[i] = view.getInt16(p, true) / 32768
    } else if (containerBits === 24) {
      for (let i = 0; i < frames; i++, p += step) {
        const v = (bytes[p] | (bytes[p + 1] << 8) | (bytes[p + 2] << 16)) << 8
        out[i] = (v >> 8) / 8388608
      }
    } else if (containerBits === 32) {
      for (let i = 0; i < frames; i++, p += step) out[i] = view.getInt32(p, true) / 2147483648
    } else {
      for (let i = 0; i < frames; i++, p += step) out[i] = (bytes[p] - 128) / 128
    }
  }
}

/** Up to `length` bytes from `offset` (fewer at the end of the file). */
type ReadAt = (offset: number, length: number) => Uint8Array

interface WavLayout {
  container: 'wav' | 'rf64'
  fmt: FmtChunk
  /** Where the samples start, in bytes from the start of the file. */
  dataOffset: number
  frames: number
}

const viewOf = (bytes: Uint8Array) => new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)

/**
 * Walks the RIFF/WAVE or RF64 chunk list of a file of `total` bytes, skipping anything that is not
 * `fmt ` or `data`. Refusals are decided here, from the headers, before any sample is touched, so
 * a file that claims gigabytes of audio costs nothing. A data chunk that declares more bytes than
 * the file holds is refused rather than played short, because the recording is then not the one
 * the uploader made.
 */
function readLayout(total: number, at: ReadAt, maxSeconds: number): WavLayout {
  if (total < 12) throw new AudioError('truncated', 'The WAV header is incomplete.')
  const container = chunkId(viewOf(at(0, 4)), 0) === 'RF64' ? 'rf64' : 'wav'
  let ds64DataSize: number | undefined
  let fmt: FmtChunk | undefined
  let offset = 12

  while (offset + 8 <= total) {
    const header = viewOf(at(offset, 8))
    const id = chunkId(header, 0)
    let size = header.getUint32(4, true)
    const body = offset + 8

    if (id === 'ds64') {
      if (size < 24 || body + 24 > total) {
        throw new AudioError('truncated', 'The RF64 size chunk is incomplete.')
      }
      // Sizes beyond 2^53 cannot be real files; the number type keeps the refusal exact enough.
      const ds64 = viewOf(at(body, 24))
      ds64DataSize = ds64.getUint32(8, true) + ds64.getUint32(12, true) * 0x1_0000_0000
    } else if (id === 'fmt ') {
      if (body + Math.min(size, 40) > total) {
        throw new AudioError('truncated', 'The WAV format chunk is incomplete.')
      }
      fmt = readFmt(viewOf(at(body, Math.min(size, 40))), 0, size)
    } else if (id === 'data') {
      if (!fmt) throw new AudioError('corrupt', 'The WAV data comes before its format chunk.')
      if (container === 'rf64' && size === SIZE_IN_DS64 && ds64DataSize !== undefined) {
        size = ds64DataSize
      }
      const declaredFrames = Math.floor(size / fmt.blockAlign)
      if (declaredFrames / fmt.sampleRate > maxSeconds) {
        throw new AudioError(
          'too_long',
          'The recording lasts ' +
            `${Math.round(declaredFrames / fmt.sampleRate)} s; the limit is ${maxSeconds} s.`,
        )
      }
      const present = Math.min(size, total - body)
      if (present < fmt.blockAlign) throw new AudioError('empty', 'The WAV holds no samples.')
      if (present < size) {
        throw new AudioError(
          'truncated',
          `The WAV declares ${size} bytes of samples but holds only ${present}.`,
        )
      }
      return { container, fmt, dataOffset: body, frames: declaredFrames }
    }
    offset = body + size + (size & 1)
  }
  if (!fmt) throw new AudioError('corrupt', 'The WAV has no format chunk.')
  throw new AudioError('empty', 'The WAV holds no samples.')
}

function decoded(layout: WavLayout, channels: Float32Array[]): DecodedAudio {
  return {
    container: layout.container,
    sampleRate: layout.fmt.sampleRate,
    channels,
    bitDepth: layout.fmt.validBits,
    format: layout.fmt.format,
  }
}

const newChannels = (layout: WavLayout) =>
  Array.from({ length: layout.fmt.channels }, () => new Float32Array(layout.frames))

/** Reads RIFF/WAVE and RF64 held in memory (see readLayout for what is refused). */
export function decodeWav(bytes: Uint8Array, options: DecodeOptions = {}): DecodedAudio {
  const at: ReadAt = (offset, length) => bytes.subarray(offset, offset + length)
  const layout = readLayout(bytes.length, at, options.maxSeconds ?? Infinity)
  const channels = newChannels(layout)
  const data = bytes.subarray(
    layout.dataOffset,
    layout.dataOffset + layout.frames * layout.fmt.blockAlign,
  )
  deinterleave(data, layout.fmt, layout.frames, channels)
  return decoded(layout, channels)
}

// Headers are read through a window of this size, so a file of many small chunks costs few reads.
const HEADER_WINDOW = 64 * 1024
// Samples are read in blocks of about this size: the file never sits in memory beside them.
const DATA_BLOCK = 1024 * 1024

/** Header reads through a window of the file, for the chunk walk (a few bytes at a time). */
function windowedReader(fd: number, total: number): ReadAt {
  let start = 0
  let window = new Uint8Array(0)
  return (offset, length) => {
    if (offset < start || offset + length > start + window.length) {
      const size = Math.max(0, Math.min(Math.max(length, HEADER_WINDOW), total - offset))
      const buffer = new Uint8Array(size)
      window = buffer.subarray(0, readSync(fd, buffer, 0, size, offset))
      start = offset
    }
    return window.subarray(offset - start, offset - start + length)
  }
}

/**
 * Reads a WAV or RF64 file from disk: the same refusals and the same samples as `decodeWav`, but
 * the file itself is never held whole; its samples arrive in blocks of about 1 MB, each written
 * straight into the channel arrays.
 */
export async function decodeWavFile(
  path: string,
  options: DecodeOptions = {},
): Promise<DecodedAudio> {
  const file = await open(path, 'r')
  try {
    const { size } = await file.stat()
    const layout = readLayout(size, windowedReader(file.fd, size), options.maxSeconds ?? Infinity)
    const { fmt, frames } = layout
    const channels = newChannels(layout)
    const blockFrames = Math.max(1, Math.floor(DATA_BLOCK / fmt.blockAlign))
    const block = new Uint8Array(Math.min(frames, blockFrames) * fmt.blockAlign)
    for (let done = 0; done < frames;) {
      const count = Math.min(blockFrames, frames - done)
      const length = count * fmt.blockAlign
      const position = layout.dataOffset + done * fmt.blockAlign
      for (let filled = 0; filled < length;) {
        const { bytesRead } = await file.read(block, filled, length - filled, position + filled)
        // The file was measured above; it can only be shorter now if it changed under us.
        if (bytesRead === 0) throw new AudioError('truncated', 'The WAV ended while it was read.')
        filled += bytesRead
      }
      deinterleave(block.subarray(0, length), fmt, count, channels, done)
      done += count
    }
    return decoded(layout, channels)
  } finally {
    await file.close()
  }
}
