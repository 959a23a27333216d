import { describe, expect, it } from 'vitest'
import {
  chooseSetFormat,
  decodeWav,
  END_FADE_SECONDS,
  estimateF0,
  fitChannels,
  fitLength,
  gatedLoudness,
  integratedLoudness,
  loudnessBlocks,
  renderMatchedSet,
  resampleChannel,
  samplePeakDbfs,
  setFormatProblems,
  synth,
  type DecodedAudio,
} from '../../../server/audio/index.ts'

/** Positive-going zero crossings per second over the middle of a tone: its frequency. */
function zeroCrossingHz(samples: Float32Array, rate: number): number {
  const from = Math.round(0.5 * rate)
  const to = samples.length - Math.round(0.5 * rate)
  let first = -1
  let last = -1
  let count = 0
  for (let i = from; i < to; i++) {
    if (samples[i - 1] < 0 && samples[i] >= 0) {
      // Linear interpolation between the two samples gives the crossing to a fraction of one.
      const at = i - 1 + samples[i - 1] / (samples[i - 1] - samples[i])
      if (first < 0) first = at
      else count++
      last = at
    }
  }
  return (count * rate) / (last - first)
}

const middlePeakDbfs = (x: Float32Array, rate: number) =>
  samplePeakDbfs([x.subarray(Math.round(0.5 * rate), x.length - Math.round(0.5 * rate))])

describe('resampling', () => {
  it.each([
    [44_100, 48_000],
    [96_000, 48_000],
    [88_200, 48_000],
  ])('keeps a 997 Hz sine at its frequency and level from %i Hz to %i Hz', (from, to) => {
    // The tone is defined at 997 Hz and −20 dBFS; a resampler must change neither (sampling
    // theorem: a band-limited signal is fully described at any rate above twice its bandwidth).
    const tone = synth.sine({ frequency: 997, seconds: 4, sampleRate: from, peakDbfs: -20 })
    const out = resampleChannel(tone, from, to)
    expect(Math.abs(out.length - (tone.length * to) / from)).toBeLessThanOrEqual(1)
    expect(zeroCrossingHz(out, to)).toBeCloseTo(997, 1)
    expect(estimateF0(out, to)!.f0Hz).toBeCloseTo(997, 0)
    expect(middlePeakDbfs(out, to)).toBeCloseTo(-20, 1)
  })

  it('keeps the loudness of EBU Tech 3341 case 1 (stereo 1 kHz at −23 dBFS reads −23.0 LUFS)', () => {
    const [left, right] = synth.stereoSine({
      frequency: 1000,
      seconds: 20,
      sampleRate: 44_100,
      peakDbfs: -23,
    })
    const out = [resampleChannel(left, 44_100, 48_000), resampleChannel(right, 44_100, 48_000)]
    expect(Math.abs(integratedLoudness(out, 48_000) + 23)).toBeLessThan(0.1)
  })

  it('filters out what the lower rate cannot hold instead of folding it back', () => {
    // 30 kHz is above the 24 kHz Nyquist frequency of 48 kHz: kept, it would alias to 18 kHz.
    const high = synth.sine({ frequency: 30_000, seconds: 2, sampleRate: 96_000, peakDbfs: -6 })
    expect(middlePeakDbfs(resampleChannel(high, 96_000, 48_000), 48_000)).toBeLessThan(-60)
  })

  it('leaves the input alone and returns it unchanged at the same rate', () => {
    const tone = synth.sine({ frequency: 440, seconds: 1, sampleRate: 96_000 })
    const copy = tone.slice()
    resampleChannel(tone, 96_000, 48_000)
    expect(tone).toEqual(copy)
    expect(resampleChannel(tone, 96_000, 96_000)).toBe(tone)
  })
})

describe('the set format', () => {
  const take = (sampleRate: number, channels: number, bitDepth: number, seconds: number) => ({
    sampleRate,
    channels,
    bitDepth,
    frames: Math.round(seconds * sampleRate),
  })

  it('takes the highest rate up to 48 kHz, the most channels, 24 bits if any take is deeper, the shortest length', () => {
    const format = chooseSetFormat([
      take(44_100, 1, 16, 5),
      take(48_000, 2, 16, 20),
      take(96_000, 1, 24, 12),
    ])
    // 5 s at 48 kHz is 240 000 frames (computed).
    expect(format).toEqual({ sampleRate: 48_000, channels: 2, bitDepth: 24, frames: 240_000 })
  })

  it('keeps a set recorded at one rate at that rate, and 16-bit takes at 16 bits', () => {
    expect(chooseSetFormat([take(44_100, 1, 16, 3), take(44_100, 1, 16, 4)])).toEqual({
      sampleRate: 44_100,
      channels: 1,
      bitDepth: 16,
      frames: 132_300,
    })
    expect(chooseSetFormat([take(96_000, 2, 32, 2)]).sampleRate).toBe(48_000)
  })

  it('names a set shorter than the minimum, and a take whose channels cannot be spread', () => {
    const takes = [take(48_000, 2, 16, 3), take(48_000, 4, 16, 0.3), take(48_000, 1, 16, 3)]
    const problems = setFormatProblems(takes, chooseSetFormat(takes), 0.5)
    expect(problems).toEqual([
      { kind: 'too_short', index: 1, seconds: 0.3 },
      { kind: 'channels', index: 0, channels: 2 },
    ])
  })
})

describe('fitting a take to the set length', () => {
  const rate = 48_000

  it('cuts to the length and ends with a raised-cosine fade of 30 ms', () => {
    const steady = new Float32Array(rate).fill(0.5)
    const [out] = fitLength([steady], 24_000, rate)
    const fade = Math.round(END_FADE_SECONDS * rate)
    expect(out.length).toBe(24_000)
    expect(out[24_000 - fade - 1]).toBe(0.5)
    // Half-way through a raised-cosine fade the gain is 0.5 + 0.5·cos(π/2) = 0.5 (computed).
    expect(out[24_000 - fade / 2 - 1]).toBeCloseTo(0.25, 6)
    expect(out[24_000 - 1]).toBe(0)
    expect(steady[23_999]).toBe(0.5)
  })

  it('pads a take short by a frame with silence, and spreads mono over the set channels', () => {
    const [left, right] = fitLength(fitChannels([new Float32Array(100).fill(0.25)], 2), 101, rate)
    expect(left.length).toBe(101)
    expect(left[100]).toBe(0)
    expect(right).toEqual(left)
    expect(right).not.toBe(left)
  })
})

describe('the loudness of a rendition', () => {
  it('reads the same from blocks at a gain as from the signal scaled by it', () => {
    // EBU Tech 3341 case 4 (−72/−36/−23/−36/−72 dBFS for 10/10/60/10/10 s reads −23.0): the gates
    // decide the reading, so scaling the blocks must agree with scaling the samples.
    const steps = [-72, -36, -23, -36, -72].map((peakDbfs, i) => ({
      seconds: i === 2 ? 60 : 10,
      peakDbfs,
    }))
    const tone = synth.steppedSine({ frequency: 1000, steps })
    const blocks = loudnessBlocks([tone, tone], 48_000)
    expect(Math.abs(gatedLoudness(blocks) + 23)).toBeLessThan(0.1)
    for (const gainDb of [-12, 6]) {
      const g = 10 ** (gainDb / 20)
      const scaled = tone.map((v) => v * g)
      expect(gatedLoudness(blocks, g * g)).toBeCloseTo(
        integratedLoudness([scaled, scaled], 48_000),
        4,
      )
    }
  })

  const decoded = (channels: Float32Array[], sampleRate = 48_000, bitDepth = 24): DecodedAudio => ({
    container: 'wav',
    sampleRate,
    channels,
    bitDepth,
    format: 'pcm',
  })

  // Synthetic plucked ring-outs (one partial, T60 of 3, 5 and 10 s; a quiet six-partial pluck).
  const RING_OUTS = [
    { t60: 3, peakDbfs: -0.5, harmonics: 1 },
    { t60: 5, peakDbfs: -0.5, harmonics: 1 },
    { t60: 10, peakDbfs: -0.5, harmonics: 1 },
    { t60: 2, peakDbfs: -30, harmonics: 6 },
  ]

  it.each(RING_OUTS)(
    'brings a plucked ring-out (T60 $t60 s, peak $peakDbfs dBFS) to −23 LUFS within 0.05 LU, where target minus loudness misses',
    ({ t60, peakDbfs, harmonics }) => {
      // EBU R 128: programme loudness −23 LUFS. The gain of target minus loudness assumes the
      // reading moves dB for dB with gain, which BS.1770's fixed −70 LUFS gate breaks.
      const note = synth.pluckedNote({ f0: 196, t60, seconds: 20, peakDbfs, harmonics })
      const naive = -23 - integratedLoudness([note], 48_000)
      const naiveReading = integratedLoudness([note.map((v) => v * 10 ** (naive / 20))], 48_000)
      expect(Math.abs(naiveReading + 23)).toBeGreaterThan(0.1)

      const { renditions, targetLufs } = renderMatchedSet([decoded([note])])
      expect(targetLufs).toBe(-23)
      const back = decodeWav(renditions[0].bytes)
      const reading = integratedLoudness(back.channels, back.sampleRate)
      expect(Math.abs(reading + 23)).toBeLessThan(0.05)
      expect(renditions[0].loudnessLufs).toBeCloseTo(reading, 6)
      expect(samplePeakDbfs(back.channels)).toBeLessThanOrEqual(-1)
    },
  )

  it('lowers a whole set together to keep every peak under −1 dBFS, all at one level', () => {
    const spiky = synth.pluckedNote({ f0: 440, t60: 0.05, seconds: 6, peakDbfs: -1 })
    const ring = synth.pluckedNote({ f0: 196, t60: 4, seconds: 6, peakDbfs: -0.5, harmonics: 1 })
    const bowed = synth.bowedTone({ f0: 196, seconds: 6, attackSeconds: 0.1, peakDbfs: -12 })
    const { renditions, targetLufs } = renderMatchedSet([
      decoded([spiky]),
      decoded([ring]),
      decoded([bowed]),
    ])
    expect(targetLufs).toBeLessThan(-25)
    const peaks = renditions.map((r) => {
      const back = decodeWav(r.bytes)
      expect(
        Math.abs(integratedLoudness(back.channels, back.sampleRate) - targetLufs),
      ).toBeLessThan(0.05)
      return samplePeakDbfs(back.channels)
    })
    expect(Math.max(...peaks)).toBeLessThanOrEqual(-1 + 1e-3)
    // The set came down only as far as the spiky take needs: it sits at the ceiling.
    expect(Math.max(...peaks)).toBeGreaterThan(-1.05)
  })

  it('writes takes of 44.1, 48 and 96 kHz, mono and stereo, 16 and 24 bits as one format', () => {
    const at = (rate: number, seconds: number) =>
      synth.bowedTone({ f0: 220, seconds, attackSeconds: 0.05, peakDbfs: -9, sampleRate: rate })
    const a = at(44_100, 5)
    const b = at(48_000, 8)
    const c = at(96_000, 6)
    const { renditions, format } = renderMatchedSet([
      decoded([a], 44_100, 16),
      decoded([b, b.slice()], 48_000, 16),
      decoded([c], 96_000, 24),
    ])
    expect(format).toEqual({ sampleRate: 48_000, channels: 2, bitDepth: 24, frames: 240_000 })
    const headers = renditions.map((r) => Buffer.from(r.bytes.subarray(0, 44)).toString('hex'))
    expect(new Set(headers).size).toBe(1)
    for (const r of renditions) {
      const back = decodeWav(r.bytes)
      expect(back.channels[0].length).toBe(240_000)
      expect(back.channels).toHaveLength(2)
      expect(zeroCrossingHz(back.channels[0], 48_000)).toBeCloseTo(220, 0)
    }
  })
})
