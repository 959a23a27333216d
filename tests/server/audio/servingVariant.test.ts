import { describe, expect, it } from 'vitest'
import {
  decodeAudio,
  encodeWav,
  integratedLoudness,
  servingVariant,
  synth,
} from '../../../server/audio'

const tone = synth.bowedTone({ sampleRate: 48_000, seconds: 2, f0: 440, attackSeconds: 0.05 })

describe('serving variants of one rendition', () => {
  it.each([16, 24] as const)('differ byte for byte between servings at %i bits', (bitDepth) => {
    const wav = encodeWav([tone], 48_000, { bitDepth })
    const a = servingVariant(wav, 'serving-a')
    const b = servingVariant(wav, 'serving-b')

    expect(a.length).toBe(wav.length)
    expect(Buffer.from(a).equals(Buffer.from(b))).toBe(false)
    // The header is untouched: only samples move.
    expect(Buffer.from(a.subarray(0, 44)).equals(Buffer.from(wav.subarray(0, 44)))).toBe(true)
  })

  it('gives the same bytes for the same serving every time, so Range requests agree', () => {
    const wav = encodeWav([tone], 48_000, { bitDepth: 16 })
    expect(
      Buffer.from(servingVariant(wav, 'x')).equals(Buffer.from(servingVariant(wav, 'x'))),
    ).toBe(true)
  })

  it('changes no sample by more than one step and leaves the loudness as it was', async () => {
    const wav = encodeWav([tone], 48_000, { bitDepth: 16 })
    const original = await decodeAudio(wav)
    const served = await decodeAudio(servingVariant(wav, 'serving-a'))
    let largest = 0
    for (let i = 0; i < original.channels[0].length; i++)
      largest = Math.max(largest, Math.abs(original.channels[0][i] - served.channels[0][i]))
    // One 16-bit step is 1/32768 of full scale (computed).
    expect(largest).toBeLessThanOrEqual(1 / 32768 + 1e-9)
    const before = integratedLoudness(original.channels, 48_000)
    const after = integratedLoudness(served.channels, 48_000)
    expect(Math.abs(after - before)).toBeLessThan(0.01)
  })
})

describe('padding a serving', () => {
  it('pads with near-silence to the size asked for, whole frames only, and stays a valid WAV', async () => {
    const stereo = [tone, tone.slice()]
    const wav = encodeWav(stereo, 48_000, { bitDepth: 24 })
    const served = servingVariant(wav, 'pad', wav.length + 4801)
    // 4801 bytes is 800 stereo 24-bit frames and one byte: the odd byte is not padded.
    expect(served.length).toBe(wav.length + 4800)
    const decoded = await decodeAudio(served)
    expect(decoded.channels[0].length).toBe(tone.length + 800)
    expect(Math.max(...decoded.channels[0].subarray(tone.length).map(Math.abs))).toBeLessThan(1e-6)
  })

  it('never shortens a rendition', () => {
    const wav = encodeWav([tone], 48_000, { bitDepth: 16 })
    expect(servingVariant(wav, 'short', 100).length).toBe(wav.length)
  })
})
