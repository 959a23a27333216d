import { describe, expect, it } from 'vitest'
import {
  analyseClip,
  decodeAudio,
  encodeWav,
  infoListChunk,
  integratedLoudness,
  matchedSetGains,
  renditionGain,
  samplePeakDbfs,
  synth,
  writeRenditionWav,
} from '../../../server/audio/index.ts'

const RATE = 48_000

function chunkIds(bytes: Uint8Array): string[] {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  const ids: string[] = []
  for (let offset = 12; offset + 8 <= bytes.length;) {
    ids.push(String.fromCharCode(...bytes.subarray(offset, offset + 4)))
    const size = view.getUint32(offset + 4, true)
    offset += 8 + size + (size & 1)
  }
  return ids
}

function contains(haystack: Uint8Array, needle: string): boolean {
  return Buffer.from(haystack).includes(Buffer.from(needle, 'utf8'))
}

describe('blind rendition', () => {
  const recipeName = 'Steel core, flat chrome winding, damped v3'
  const tone = synth.bowedTone({ f0: 196, seconds: 2, attackSeconds: 0.1, peakDbfs: -10 })
  const original = encodeWav([tone, tone], RATE, {
    bitDepth: 24,
    chunksBeforeData: [infoListChunk({ INAM: recipeName, ISFT: 'Take 4' })],
    chunksAfterData: [{ id: 'id3 ', data: new TextEncoder().encode(recipeName) }],
  })

  it('keeps only the format and data chunks, so the recipe name is gone', async () => {
    expect(contains(original, recipeName)).toBe(true)
    const audio = await decodeAudio(original)
    const rendition = writeRenditionWav(audio.channels, audio.sampleRate, {
      bitDepth: 16,
      gainDb: 0,
    })
    expect(contains(rendition, recipeName)).toBe(false)
    expect(contains(rendition, 'Take 4')).toBe(false)
    expect(chunkIds(rendition)).toEqual(['fmt ', 'data'])
    expect(rendition.length).toBe(44 + tone.length * 2 * 2)
  })

  it.each([16, 24] as const)('applies the gain exactly at %i bits', async (bitDepth) => {
    const audio = await decodeAudio(original)
    const rendition = writeRenditionWav(audio.channels, RATE, { bitDepth, gainDb: -6 })
    const back = await decodeAudio(rendition)
    expect(back.bitDepth).toBe(bitDepth)
    expect(samplePeakDbfs(back.channels)).toBeCloseTo(samplePeakDbfs(audio.channels) - 6, 2)
    const change =
      integratedLoudness(back.channels, RATE) - integratedLoudness(audio.channels, RATE)
    expect(change).toBeCloseTo(-6, 2)
  })

  it('reaches −23 LUFS through analyse → gain → write → analyse', async () => {
    const first = await analyseClip(original, { kind: 'bowed' })
    const gainDb = renditionGain(first.loudnessLufs!, first.peakDbfs)
    const audio = await decodeAudio(original)
    const rendition = writeRenditionWav(audio.channels, RATE, { bitDepth: 24, gainDb })
    const second = await analyseClip(rendition, { kind: 'bowed' })
    expect(second.loudnessLufs).toBeCloseTo(-23, 1)
    expect(second.peakDbfs).toBeLessThanOrEqual(-1)
  })
})

describe('rendition gain', () => {
  it('brings a clip to the target loudness (computed: −23 − (−17) = −6 dB)', () => {
    expect(renditionGain(-17, -3)).toBe(-6)
    expect(renditionGain(-30, -20, -20)).toBe(10)
  })

  it('holds the peak at the ceiling when the target would push it over', () => {
    // −35 LUFS with peaks at −8 dBFS: +12 dB would peak at +4, so the gain stops at +7.
    expect(renditionGain(-35, -8)).toBe(7)
    expect(renditionGain(-35, -8, -23, -3)).toBe(5)
  })

  it('lowers the whole matched set together when any clip would peak over the ceiling', () => {
    const set = [
      { loudnessLufs: -20, peakDbfs: -6 },
      { loudnessLufs: -30, peakDbfs: -10 }, // +7 dB would peak at −3: fine
      { loudnessLufs: -28, peakDbfs: -2 }, // +5 dB would peak at +3: 4 dB over −1
    ]
    const { gainsDb, targetLufs } = matchedSetGains(set)
    expect(targetLufs).toBe(-27)
    expect(gainsDb).toEqual([-7, 3, 1])
    set.forEach((clip, i) => {
      expect(clip.loudnessLufs + gainsDb[i]).toBe(-27)
      expect(clip.peakDbfs + gainsDb[i]).toBeLessThanOrEqual(-1)
    })
  })

  it('keeps the target when every clip fits under the ceiling', () => {
    const { gainsDb, targetLufs } = matchedSetGains([
      { loudnessLufs: -18, peakDbfs: -4 },
      { loudnessLufs: -25, peakDbfs: -12 },
    ])
    expect(targetLufs).toBe(-23)
    expect(gainsDb).toEqual([-5, 2])
  })

  it('refuses to level-match silence', () => {
    expect(() => renditionGain(-Infinity, -Infinity)).toThrow(/silent/)
  })
})
