export interface WavChunk {
  /** Four ASCII characters, e.g. 'LIST'. */
  id: string
  data: Uint8Array
}

export interface WavEncodeOptions {
  bitDepth: 8 | 16 | 24 | 32 | 64
  format?: 'pcm' | 'float'
  /** Write the WAVE_FORMAT_EXTENSIBLE form of the format chunk. */
  extensible?: boolean
  /** Linear factor applied to every sample before conversion. */
  gain?: number
  /** Extra chunks placed before the data chunk, as recorders do with their metadata. */
  chunksBeforeData?: readonly WavChunk[]
  chunksAfterData?: readonly WavChunk[]
  /** Size written in the data chunk header instead of the true one, to make broken files. */
  declaredDataBytes?: number
}

const encoder = new TextEncoder()

/** A LIST/INFO chunk holding the given text fields, e.g. { INAM: 'title' }. */
export function infoListChunk(fields: Record<string, string>): WavChunk {
  const parts: Uint8Array[] = [encoder.encode('INFO')]
  for (const [id, text] of Object.entries(fields)) {
    const value = encoder.encode(`${text}\0`)
    const header = new Uint8Array(8)
    header.set(encoder.encode(id.padEnd(4).slice(0, 4)))
    new DataView(header.buffer).setUint32(4, value.length, true)
    parts.push(header, value)
    if (value.length & 1) parts.push(new Uint8Array(1))
  }
  return { id: 'LIST', data: concatBytes(parts) }
}

/**
 * Encodes interleaved WAV. Used for fixtures in tests and the demo seed, and (through
 * `writeRenditionWav`, with only a format and a data chunk) for blind renditions.
 * Integer samples are rounded and clipped at full scale.
 */
export function encodeWav(
  channels: readonly Float32Array[],
  sampleRate: number,
  options: WavEncodeOptions,
): Uint8Array {
  const { bitDepth, format = 'pcm', extensible = false, gain = 1 } = options
  const frames = channels[0]?.length ?? 0
  const bytesPerSample = bitDepth / 8
  const blockAlign = bytesPerSample * channels.length
  const data = new Uint8Array(frames * blockAlign)
  writeSamples(data, channels, format, bitDepth, gain, 0, frames)
  const fmt = fmtChunk(channels.length, sampleRate, bitDepth, format, extensible)

  const chunks: Uint8Array[] = [encoder.encode('WAVE'), chunk('fmt ', fmt)]
  for (const c of options.chunksBeforeData ?? []) chunks.push(chunk(c.id, c.data))
  chunks.push(chunk('data', data, options.declaredDataBytes))
  for (const c of options.chunksAfterData ?? []) chunks.push(chunk(c.id, c.data))
  const body = concatBytes(chunks)
  const header = new Uint8Array(8)
  header.set(encoder.encode('RIFF'))
  new DataView(header.buffer).setUint32(4, body.length, true)
  return concatBytes([header, body])
}

function fmtChunk(
  channelCount: number,
  sampleRate: number,
  bitDepth: number,
  format: 'pcm' | 'float',
  extensible: boolean,
): Uint8Array {
  const blockAlign = (bitDepth / 8) * channelCount
  const fmt = new Uint8Array(extensible ? 40 : 16)
  const f = new DataView(fmt.buffer)
  const tag = format === 'float' ? 3 : 1
  f.setUint16(0, extensible ? 0xfffe : tag, true)
  f.setUint16(2, channelCount, true)
  f.setUint32(4, sampleRate, true)
  f.setUint32(8, sampleRate * blockAlign, true)
  f.setUint16(12, blockAlign, true)
  f.setUint16(14, bitDepth, true)
  if (extensible) {
    f.setUint16(16, 22, true)
    f.setUint16(18, bitDepth, true)
    f.setUint32(20, 0, true)
    // KSDATAFORMAT_SUBTYPE_PCM / _IEEE_FLOAT: the tag followed by the fixed GUID tail.
    fmt.set(
      [tag, 0, 0, 0, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71],
      24,
    )
  }
  return fmt
}

/**
 * The 44 bytes before the samples of a plain PCM WAV holding only a format and a data chunk, as
 * `encodeWav` writes it; the samples follow, then one pad byte when their length is odd.
 */
export function pcmWavHeader(
  channelCount: number,
  sampleRate: number,
  bitDepth: 8 | 16 | 24 | 32,
  frames: number,
): Uint8Array {
  const dataLength = frames * (bitDepth / 8) * channelCount
  const header = new Uint8Array(44)
  const view = new DataView(header.buffer)
  header.set(encoder.encode('RIFF'))
  view.setUint32(4, 4 + 8 + 16 + 8 + dataLength + (dataLength & 1), true)
  header.set(encoder.encode('WAVEfmt '), 8)
  view.setUint32(16, 16, true)
  header.set(fmtChunk(channelCount, sampleRate, bitDepth, 'pcm', false), 20)
  header.set(encoder.encode('data'), 36)
  view.setUint32(40, dataLength, true)
  return header
}

/** The integer a sample becomes at a bit depth of full scale `full`: rounded, clipped. */
export const pcmInteger = (x: number, full: number) =>
  Math.max(-full, Math.min(full - 1, Math.round(x * full)))

/**
 * Frames `from`…`to` of the channels, interleaved from the start of `out`: a whole file at once,
 * or one block of it at a time.
 */
export function writeSamples(
  out: Uint8Array,
  channels: readonly Float32Array[],
  format: 'pcm' | 'float',
  bitDepth: number,
  gain: number,
  from: number,
  to: number,
): void {
  const view = new DataView(out.buffer, out.byteOffset, out.byteLength)
  const count = channels.length
  const bytesPerSample = bitDepth / 8
  const full = 2 ** (bitDepth - 1)
  channels.forEach((channel, c) => {
    let p = c * bytesPerSample
    const step = count * bytesPerSample
    for (let i = from, end = Math.min(to, channel.length); i < end; i++, p += step) {
      const x = channel[i] * gain
      if (format === 'float') {
        if (bitDepth === 64) view.setFloat64(p, x, true)
        else view.setFloat32(p, x, true)
        continue
      }
      const v = pcmInteger(x, full)
      if (bitDepth === 8) out[p] = v + 128
      else if (bitDepth === 16) view.setInt16(p, v, true)
      else if (bitDepth === 32) view.setInt32(p, v, true)
      else {
        out[p] = v & 0xff
        out[p + 1] = (v >> 8) & 0xff
        out[p + 2] = (v >> 16) & 0xff
      }
    }
  })
}

function chunk(id: string, data: Uint8Array, declaredSize = data.length): Uint8Array {
  const out = new Uint8Array(8 + data.length + (data.length & 1))
  out.set(encoder.encode(id))
  new DataView(out.buffer).setUint32(4, declaredSize, true)
  out.set(data, 8)
  return out
}

export function concatBytes(parts: readonly Uint8Array[]): Uint8Array {
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0))
  let offset = 0
  for (const part of parts) {
    out.set(part, offset)
    offset += part.length
  }
  return out
}
