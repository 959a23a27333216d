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

function deinterleave(bytes: Uint8Array, fmt: FmtChunk, frames: number): Float32Array[] {
  const { channels: count, containerBits, format } = fmt
  const channels = Array.from({ length: count }, () => new Float32Array(frames))
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  // One tight loop per sample layout: this is the hot path for every upload.
  for (let c = 0; c < count; c++) {
    const out = channels[c]
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
  return channels
}

/**
 * Reads RIFF/WAVE and RF64 by walking the chunk list, skipping anything that is not `fmt ` or
 * `data`. Refusals are decided from the header before samples are touched, so a file that claims
 * gigabytes of audio costs nothing. A data chunk that declares more bytes than the file holds is
 * refused rather than played short, because the recording is then not the one the uploader made.
 */
export function decodeWav(bytes: Uint8Array, options: DecodeOptions = {}): DecodedAudio {
  const maxSeconds = options.maxSeconds ?? Infinity
  if (bytes.length < 12) throw new AudioError('truncated', 'The WAV header is incomplete.')
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  const container = chunkId(view, 0) === 'RF64' ? 'rf64' : 'wav'
  let ds64DataSize: number | undefined
  let fmt: FmtChunk | undefined
  let offset = 12

  while (offset + 8 <= bytes.length) {
    const id = chunkId(view, offset)
    let size = view.getUint32(offset + 4, true)
    const body = offset + 8

    if (id === 'ds64') {
      if (size < 24 || body + 24 > bytes.length) {
        throw new AudioError('truncated', 'The RF64 size chunk is incomplete.')
      }
      // Sizes beyond 2^53 cannot be real files; the number type keeps the refusal exact enough.
      ds64DataSize =
        view.getUint32(body + 8, true) + view.getUint32(body + 12, true) * 0x1_0000_0000
    } else if (id === 'fmt ') {
      if (body + Math.min(size, 40) > bytes.length) {
        throw new AudioError('truncated', 'The WAV format chunk is incomplete.')
      }
      fmt = readFmt(view, body, size)
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
      const present = Math.min(size, bytes.length - body)
      if (present < fmt.blockAlign) throw new AudioError('empty', 'The WAV holds no samples.')
      if (present < size) {
        throw new AudioError(
          'truncated',
          `The WAV declares ${size} bytes of samples but holds only ${present}.`,
        )
      }
      const data = bytes.subarray(body, body + declaredFrames * fmt.blockAlign)
      return {
        container,
        sampleRate: fmt.sampleRate,
        channels: deinterleave(data, fmt, declaredFrames),
        bitDepth: fmt.validBits,
        format: fmt.format,
      }
    }
    offset = body + size + (size & 1)
  }
  if (!fmt) throw new AudioError('corrupt', 'The WAV has no format chunk.')
  throw new AudioError('empty', 'The WAV holds no samples.')
}
