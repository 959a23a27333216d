import { concatBytes } from './wavEncoder.ts'

export interface FlacEncodeOptions {
  bitDepth: 16 | 24
  blockSize?: number
}

/**
 * A minimal FLAC writer for fixtures: every subframe is VERBATIM (no compression), which keeps
 * the writer short and independent of the decoder under test while producing valid FLAC.
 */
export function encodeFlac(
  channels: readonly Float32Array[],
  sampleRate: number,
  options: FlacEncodeOptions,
): Uint8Array {
  const { bitDepth, blockSize = 4096 } = options
  const frames = channels[0]?.length ?? 0
  const full = 2 ** (bitDepth - 1)
  const parts: Uint8Array[] = [new TextEncoder().encode('fLaC'), streamInfo()]

  for (let start = 0, n = 0; start < frames; start += blockSize, n++) {
    const size = Math.min(blockSize, frames - start)
    // Rate and size are repeated in every frame header: the decoder is handed frames one by
    // one and never sees STREAMINFO.
    const rate = sampleRateCode(sampleRate)
    const header = [
      0xff,
      0xf8,
      0x70 | rate.code,
      ((channels.length - 1) << 4) | (sampleSizeCode() << 1),
    ]
    header.push(...utf8Number(n), (size - 1) >> 8, (size - 1) & 0xff, ...rate.tail)
    header.push(crc8(header))
    const bytesPerSample = bitDepth / 8
    const frame = new Uint8Array(header.length + channels.length * (1 + size * bytesPerSample) + 2)
    frame.set(header)
    let p = header.length
    for (const channel of channels) {
      frame[p++] = 0x02 // subframe type VERBATIM, no wasted bits
      for (let i = start; i < start + size; i++) {
        const v = Math.max(-full, Math.min(full - 1, Math.round(channel[i] * full)))
        for (let b = bytesPerSample - 1; b >= 0; b--) frame[p++] = (v >> (8 * b)) & 0xff
      }
    }
    const crc = crc16(frame.subarray(0, p))
    frame[p++] = crc >> 8
    frame[p] = crc & 0xff
    parts.push(frame)
  }
  return concatBytes(parts)

  function sampleSizeCode(): number {
    return bitDepth === 16 ? 0b100 : 0b110
  }

  function streamInfo(): Uint8Array {
    const block = new Uint8Array(4 + 34)
    block[0] = 0x80 // last metadata block, type STREAMINFO
    block[3] = 34
    const b = block.subarray(4)
    const span = Math.max(16, Math.min(blockSize, frames))
    b[0] = span >> 8
    b[1] = span & 0xff
    b[2] = span >> 8
    b[3] = span & 0xff
    // Minimum and maximum frame sizes stay 0 (unknown), as the format allows.
    b[10] = (sampleRate >> 12) & 0xff
    b[11] = (sampleRate >> 4) & 0xff
    b[12] = ((sampleRate & 0x0f) << 4) | ((channels.length - 1) << 1) | ((bitDepth - 1) >> 4)
    b[13] = (((bitDepth - 1) & 0x0f) << 4) | Math.floor(frames / 2 ** 32)
    b[14] = (frames >>> 24) & 0xff
    b[15] = (frames >>> 16) & 0xff
    b[16] = (frames >>> 8) & 0xff
    b[17] = frames & 0xff
    // MD5 left as zeros: "not computed", which decoders accept.
    return block
  }
}

const SAMPLE_RATE_CODES: Record<number, number> = {
  88200: 0b0001,
  176400: 0b0010,
  192000: 0b0011,
  8000: 0b0100,
  16000: 0b0101,
  22050: 0b0110,
  24000: 0b0111,
  32000: 0b1000,
  44100: 0b1001,
  48000: 0b1010,
  96000: 0b1011,
}

function sampleRateCode(rate: number): { code: number; tail: number[] } {
  if (SAMPLE_RATE_CODES[rate] !== undefined) return { code: SAMPLE_RATE_CODES[rate], tail: [] }
  if (rate % 1000 === 0 && rate / 1000 < 256) return { code: 0b1100, tail: [rate / 1000] }
  if (rate < 65536) return { code: 0b1101, tail: [rate >> 8, rate & 0xff] }
  if (rate % 10 === 0 && rate / 10 < 65536) {
    return { code: 0b1110, tail: [(rate / 10) >> 8, (rate / 10) & 0xff] }
  }
  throw new RangeError(`FLAC frames cannot state a sample rate of ${rate} Hz.`)
}

function utf8Number(n: number): number[] {
  if (n < 0x80) return [n]
  if (n < 0x800) return [0xc0 | (n >> 6), 0x80 | (n & 0x3f)]
  if (n < 0x10000) return [0xe0 | (n >> 12), 0x80 | ((n >> 6) & 0x3f), 0x80 | (n & 0x3f)]
  return [0xf0 | (n >> 18), 0x80 | ((n >> 12) & 0x3f), 0x80 | ((n >> 6) & 0x3f), 0x80 | (n & 0x3f)]
}

function crc8(bytes: readonly number[]): number {
  let crc = 0
  for (const byte of bytes) {
    crc ^= byte
    for (let i = 0; i < 8; i++) crc = crc & 0x80 ? ((crc << 1) ^ 0x07) & 0xff : (crc << 1) & 0xff
  }
  return crc
}

function crc16(bytes: Uint8Array): number {
  let crc = 0
  for (const byte of bytes) {
    crc ^= byte << 8
    for (let i = 0; i < 8; i++)
      crc = crc & 0x8000 ? ((crc << 1) ^ 0x8005) & 0xffff : (crc << 1) & 0xffff
  }
  return crc
}
