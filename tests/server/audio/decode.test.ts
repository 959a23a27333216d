import { describe, expect, it } from 'vitest'
import {
  AudioError,
  concatBytes,
  decodeAudio,
  encodeFlac,
  encodeWav,
  infoListChunk,
  sniffContainer,
  synth,
  type AudioErrorCode,
} from '../../../server/audio/index.ts'

const RATE = 44_100
const left = synth.sine({ frequency: 440, seconds: 0.5, sampleRate: RATE, peakDbfs: -3 })
const right = synth.sine({ frequency: 660, seconds: 0.5, sampleRate: RATE, peakDbfs: -9 })

async function refusal(bytes: Uint8Array, maxSeconds?: number): Promise<AudioErrorCode> {
  try {
    await decodeAudio(bytes, { maxSeconds })
  } catch (error) {
    expect(error).toBeInstanceOf(AudioError)
    return (error as AudioError).code
  }
  throw new Error('the file was accepted')
}

function maxError(a: Float32Array, b: Float32Array): number {
  let worst = 0
  for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs(a[i] - b[i]))
  return worst
}

/** Rewrites a plain WAV as RF64 (EBU Tech 3306): sizes move to a ds64 chunk. */
function toRf64(wav: Uint8Array): Uint8Array {
  const view = new DataView(wav.buffer, wav.byteOffset, wav.byteLength)
  const ds64 = new Uint8Array(8 + 28)
  const d = new DataView(ds64.buffer)
  ds64.set(new TextEncoder().encode('ds64'))
  d.setUint32(4, 28, true)
  let offset = 12
  let dataSize = 0
  while (offset < wav.length) {
    const id = String.fromCharCode(...wav.subarray(offset, offset + 4))
    const size = view.getUint32(offset + 4, true)
    if (id === 'data') {
      dataSize = size
      view.setUint32(offset + 4, 0xffffffff, true)
    }
    offset += 8 + size + (size & 1)
  }
  d.setUint32(8, wav.length + ds64.length - 8, true)
  d.setUint32(16, dataSize, true)
  const out = concatBytes([wav.subarray(0, 12), ds64, wav.subarray(12)])
  out.set(new TextEncoder().encode('RF64'))
  new DataView(out.buffer).setUint32(4, 0xffffffff, true)
  return out
}

describe('sniffing', () => {
  it('names the container from the bytes, whatever the file is called', () => {
    const wav = encodeWav([left], RATE, { bitDepth: 16 })
    expect(sniffContainer(wav)).toBe('wav')
    expect(sniffContainer(toRf64(wav))).toBe('rf64')
    expect(sniffContainer(encodeFlac([left], RATE, { bitDepth: 16 }))).toBe('flac')
    expect(sniffContainer(new TextEncoder().encode('recipe notes, renamed to .wav'))).toBe(
      'unknown',
    )
    expect(sniffContainer(new Uint8Array())).toBe('unknown')
  })
})

describe('WAV decoding', () => {
  it.each([
    { bitDepth: 16, format: 'pcm', tolerance: 1 / 32768 },
    { bitDepth: 24, format: 'pcm', tolerance: 1 / 8388608 },
    { bitDepth: 32, format: 'pcm', tolerance: 1e-7 },
    { bitDepth: 32, format: 'float', tolerance: 0 },
    { bitDepth: 64, format: 'float', tolerance: 0 },
    { bitDepth: 8, format: 'pcm', tolerance: 1 / 128 },
  ] as const)(
    'round-trips $bitDepth-bit $format stereo',
    async ({ bitDepth, format, tolerance }) => {
      const bytes = encodeWav([left, right], RATE, { bitDepth, format })
      const audio = await decodeAudio(bytes)
      expect(audio).toMatchObject({ container: 'wav', sampleRate: RATE, bitDepth, format })
      expect(audio.channels).toHaveLength(2)
      expect(audio.channels[0]).toHaveLength(left.length)
      expect(maxError(audio.channels[0], left)).toBeLessThanOrEqual(tolerance)
      expect(maxError(audio.channels[1], right)).toBeLessThanOrEqual(tolerance)
    },
  )

  it('reads WAVE_FORMAT_EXTENSIBLE, integer and float', async () => {
    for (const [bitDepth, format] of [
      [24, 'pcm'],
      [32, 'float'],
    ] as const) {
      const bytes = encodeWav([left, right], RATE, { bitDepth, format, extensible: true })
      const audio = await decodeAudio(bytes)
      expect(audio).toMatchObject({ bitDepth, format })
      expect(maxError(audio.channels[1], right)).toBeLessThanOrEqual(1 / 8388608)
    }
  })

  it('skips metadata chunks before and after the samples', async () => {
    const info = infoListChunk({ INAM: 'Prototype 7', ICMT: 'odd-length note' })
    const bytes = encodeWav([left], RATE, {
      bitDepth: 16,
      chunksBeforeData: [info, { id: 'junk', data: new Uint8Array(3) }],
      chunksAfterData: [info],
    })
    const audio = await decodeAudio(bytes)
    expect(maxError(audio.channels[0], left)).toBeLessThanOrEqual(1 / 32768)
  })

  it('reads RF64', async () => {
    const audio = await decodeAudio(toRf64(encodeWav([left, right], RATE, { bitDepth: 24 })))
    expect(audio.container).toBe('rf64')
    expect(audio.channels[0]).toHaveLength(left.length)
    expect(maxError(audio.channels[0], left)).toBeLessThanOrEqual(1 / 8388608)
  })
})

describe('FLAC decoding', () => {
  it.each([16, 24] as const)('round-trips %i-bit stereo', async (bitDepth) => {
    const audio = await decodeAudio(encodeFlac([left, right], RATE, { bitDepth }))
    expect(audio).toMatchObject({ container: 'flac', sampleRate: RATE, bitDepth })
    expect(audio.channels[0]).toHaveLength(left.length)
    expect(maxError(audio.channels[0], left)).toBeLessThanOrEqual(2 ** (1 - bitDepth))
    expect(maxError(audio.channels[1], right)).toBeLessThanOrEqual(2 ** (1 - bitDepth))
  })

  it('reads rates that need an explicit value in each frame header', async () => {
    const audio = await decodeAudio(encodeFlac([left], 37_800, { bitDepth: 16 }))
    expect(audio.sampleRate).toBe(37_800)
  })
})

describe('refusals', () => {
  const wav = encodeWav([left, right], RATE, { bitDepth: 16 })
  const flac = encodeFlac([left, right], RATE, { bitDepth: 16 })

  it('refuses a 0-byte file as empty', async () => {
    expect(await refusal(new Uint8Array())).toBe('empty')
  })

  it('refuses a text file renamed .wav as not audio', async () => {
    expect(await refusal(new TextEncoder().encode('String tension notes\nE5 78 N\n'))).toBe(
      'not_audio',
    )
  })

  it('refuses a WAV header with no samples as empty', async () => {
    expect(await refusal(encodeWav([new Float32Array(0)], RATE, { bitDepth: 16 }))).toBe('empty')
    // A 44-byte header alone, its data size still claiming the whole recording.
    expect(await refusal(wav.subarray(0, 44))).toBe('empty')
    // Format chunk but no data chunk at all.
    expect(await refusal(wav.subarray(0, 36))).toBe('empty')
  })

  it('refuses a WAV whose data chunk declares more than the file holds as truncated', async () => {
    expect(await refusal(wav.subarray(0, wav.length - 1000))).toBe('truncated')
  })

  it('refuses a header claiming 10 GB of data without reading it', async () => {
    const size = 10 * 2 ** 30
    const huge = encodeWav([left], RATE, { bitDepth: 16 })
    const rf64 = toRf64(huge)
    // Low and high halves of the ds64 data size (a 32-bit WAV field cannot say 10 GB).
    const view = new DataView(rf64.buffer)
    view.setUint32(12 + 8 + 8, size % 2 ** 32, true)
    view.setUint32(12 + 8 + 12, Math.floor(size / 2 ** 32), true)
    expect(await refusal(rf64, 600)).toBe('too_long')
    expect(await refusal(rf64)).toBe('truncated')
    // The largest size a plain WAV can declare, 4 GB.
    const plain = encodeWav([left], RATE, { bitDepth: 16, declaredDataBytes: 0xfffffffe })
    expect(await refusal(plain, 600)).toBe('too_long')
  })

  it('refuses recordings over the maximum duration', async () => {
    expect(await refusal(wav, 0.25)).toBe('too_long')
    expect(await refusal(flac, 0.25)).toBe('too_long')
    await expect(decodeAudio(wav, { maxSeconds: 1 })).resolves.toBeDefined()
  })

  it('refuses a truncated FLAC', async () => {
    expect(await refusal(flac.subarray(0, Math.floor(flac.length / 2)))).toBe('truncated')
    expect(await refusal(flac.subarray(0, flac.length - 10))).toBe('truncated')
    expect(await refusal(flac.subarray(0, 20))).toBe('truncated')
  })

  it('refuses WAV encodings it cannot read as unsupported', async () => {
    const adpcm = encodeWav([left], RATE, { bitDepth: 16 })
    new DataView(adpcm.buffer).setUint16(20, 2, true) // format tag 2: Microsoft ADPCM
    expect(await refusal(adpcm)).toBe('unsupported_format')
  })

  it('refuses a format chunk that contradicts itself as corrupt', async () => {
    const broken = encodeWav([left], RATE, { bitDepth: 16 })
    new DataView(broken.buffer).setUint16(32, 3, true) // block align 3 for 16-bit mono
    expect(await refusal(broken)).toBe('corrupt')
  })
})
