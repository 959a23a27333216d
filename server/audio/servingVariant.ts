import { createRandom } from '../design/random.ts'

/**
 * One serving of a rendition. The same recording served twice in a session (a triangle's
 * doubled sample, a hidden duplicate) must not arrive as identical bytes, and recordings of one
 * excerpt must not differ in size, or comparing downloads would give the answer away. So the
 * data is padded with silence to `size` bytes (when larger) and every sample gets ±1 LSB of
 * noise seeded by the serving: far below hearing (about −96 dBFS at 16 bits), yet it makes each
 * serving's bytes its own. Deterministic per seed, so the Range requests of one serving agree.
 * Only integer PCM WAV with the data chunk last is changed, as renditions are written;
 * anything else is returned as it came.
 */
export function servingVariant(wav: Uint8Array, seed: string, size = 0): Uint8Array {
  const layout = pcmLayout(wav)
  if (!layout) return wav.slice()
  const { dataOffset, bits } = layout
  const bytesPerSample = bits / 8
  const block = bytesPerSample * layout.channels
  const dataLength = wav.length - dataOffset
  // Padding keeps whole frames so every channel stays aligned.
  const padded = Math.max(dataLength, Math.floor((size - dataOffset) / block) * block)
  const out = new Uint8Array(dataOffset + padded)
  out.set(wav)
  const view = new DataView(out.buffer)
  view.setUint32(4, out.length - 8, true)
  view.setUint32(dataOffset - 4, padded, true)
  addNoise(out, view, dataOffset, padded, bits, seed)
  return out
}

function pcmLayout(
  wav: Uint8Array,
): { dataOffset: number; bits: 16 | 24; channels: number } | null {
  if (wav.length < 12) return null
  const view = new DataView(wav.buffer, wav.byteOffset, wav.byteLength)
  if (view.getUint32(0, false) !== 0x52494646 || view.getUint32(8, false) !== 0x57415645)
    return null // "RIFF" … "WAVE"
  let offset = 12
  let bits = 0
  let channels = 0
  while (offset + 8 <= wav.length) {
    const id = String.fromCharCode(...wav.subarray(offset, offset + 4))
    const size = view.getUint32(offset + 4, true)
    const body = offset + 8
    if (id === 'fmt ' && body + 16 <= wav.length) {
      const format = view.getUint16(body, true)
      if (format === 1 || format === 0xfffe) {
        channels = view.getUint16(body + 2, true)
        bits = view.getUint16(body + 14, true)
      }
    }
    if (id === 'data') {
      const last = body + size === wav.length
      return last && (bits === 16 || bits === 24) && channels > 0
        ? { dataOffset: body, bits, channels }
        : null
    }
    offset = body + size + (size % 2)
  }
  return null
}

function addNoise(
  out: Uint8Array,
  view: DataView,
  start: number,
  length: number,
  bits: 16 | 24,
  seed: string,
) {
  const random = createRandom(seed)
  const bytes = bits / 8
  const max = 2 ** (bits - 1) - 1
  const min = -(2 ** (bits - 1))
  for (let p = start; p + bytes <= start + length; p += bytes) {
    const step = random.int(3) - 1
    if (step === 0) continue
    if (bits === 16) {
      view.setInt16(p, Math.max(min, Math.min(max, view.getInt16(p, true) + step)), true)
    } else {
      let v = out[p] | (out[p + 1] << 8) | (out[p + 2] << 16)
      if (v & 0x800000) v -= 0x1000000
      v = Math.max(min, Math.min(max, v + step))
      out[p] = v & 0xff
      out[p + 1] = (v >> 8) & 0xff
      out[p + 2] = (v >> 16) & 0xff
    }
  }
}
