import { describe, expect, it } from 'vitest'
import {
  analyseClip,
  AudioError,
  encodeFlac,
  encodeWav,
  synth,
  type AudioErrorCode,
} from '../../../server/audio/index.ts'

const RATE = 48_000

async function refusal(bytes: Uint8Array, maxSeconds?: number): Promise<AudioErrorCode> {
  try {
    await analyseClip(bytes, { kind: 'bowed', maxSeconds })
  } catch (error) {
    expect(error).toBeInstanceOf(AudioError)
    return (error as AudioError).code
  }
  throw new Error('the clip was accepted')
}

describe('analyseClip', () => {
  it('measures a plucked ring-out: f0, decay, loss factor', async () => {
    const note = synth.pluckedNote({
      f0: 440,
      t60: 2,
      seconds: 4,
      delaySeconds: 0.2,
      noiseFloorDbfs: -85,
    })
    const bytes = encodeWav([note, note], RATE, { bitDepth: 24 })
    const result = await analyseClip(bytes, { kind: 'plucked' })
    expect(result).toMatchObject({
      container: 'wav',
      format: 'pcm',
      sampleRate: RATE,
      channels: 2,
      bitDepth: 24,
      attack: null,
    })
    expect(result.durationSeconds).toBeCloseTo(4.2, 6)
    expect(result.f0Hz).toBeCloseTo(440, 0)
    expect(Math.abs(result.decay!.t60Seconds - 2) / 2).toBeLessThan(0.01)
    // Computed: η = 2.2/(440·2) = 0.0025 (to 2.2 rounded from ln(1000)/π).
    expect(result.decay!.lossFactor).toBeCloseTo(0.0025, 4)
    expect(result.peaks.min).toHaveLength(1000)
    expect(JSON.parse(JSON.stringify(result))).toEqual(result)
  })

  it('measures a bowed FLAC: loudness, peak, centroid, attack', async () => {
    const note = synth.bowedTone({
      f0: 196,
      seconds: 3,
      attackSeconds: 0.2,
      peakDbfs: -6,
      delaySeconds: 0.3,
    })
    const bytes = encodeFlac([note], RATE, { bitDepth: 24 })
    const result = await analyseClip(bytes, { kind: 'bowed' })
    expect(result.container).toBe('flac')
    expect(result.peakDbfs).toBeCloseTo(-6, 1)
    expect(result.loudnessLufs).toBeLessThan(-6)
    expect(result.loudnessLufs).toBeGreaterThan(-20)
    expect(result.f0Hz).toBeCloseTo(196, 0)
    expect(result.centroidHz).toBeGreaterThan(196)
    // Computed for a linear rise (see attack.test.ts): 0.608·T, within a quarter window.
    expect(Math.abs(result.attack!.attackSeconds - 0.608 * 0.2)).toBeLessThan(0.005)
    expect(result.decay).toBeNull()
  })

  it('refuses silence', async () => {
    expect(await refusal(encodeWav([new Float32Array(RATE)], RATE, { bitDepth: 16 }))).toBe(
      'silent',
    )
    const hiss = synth.whiteNoise({ seconds: 1, rmsDbfs: -80 })
    expect(await refusal(encodeWav([hiss], RATE, { bitDepth: 24 }))).toBe('silent')
  })

  it('refuses clips over the maximum duration, and bad files, with their codes', async () => {
    const tone = synth.sine({ frequency: 440, seconds: 2, peakDbfs: -6 })
    expect(await refusal(encodeWav([tone], RATE, { bitDepth: 16 }), 1.5)).toBe('too_long')
    expect(await refusal(new Uint8Array())).toBe('empty')
    expect(await refusal(new TextEncoder().encode('<html>not a recording</html>'))).toBe(
      'not_audio',
    )
  })
})
