import { kWeighting, type Biquad } from './kWeighting.ts'

const BLOCK_STEPS = 4 // 400 ms blocks made of 100 ms steps give the 75 % overlap
const ABSOLUTE_GATE_LUFS = -70
const RELATIVE_GATE_LU = -10
const LOUDNESS_OFFSET = -0.691

/**
 * BS.1770 channel weights. Mono, stereo and L/R/C all weigh 1.0; in a 5.1 layout
 * (L R C LFE Ls Rs) the LFE is left out and the surrounds weigh 1.41.
 */
export function channelWeights(channelCount: number): number[] {
  if (channelCount === 6) return [1, 1, 1, 0, 1.41, 1.41]
  return Array.from({ length: channelCount }, () => 1)
}

/**
 * Energy of the K-weighted signal in consecutive steps of `step` samples. Both filter stages run
 * in one pass without storing the filtered signal: this loop is most of the cost of analysis.
 */
function kWeightedStepEnergy(
  samples: Float32Array,
  shelf: Biquad,
  highPass: Biquad,
  step: number,
): Float64Array {
  const steps = Math.floor(samples.length / step)
  const energy = new Float64Array(steps)
  const [sb0, sb1, sb2] = shelf.b
  const [sa1, sa2] = shelf.a
  const [hb0, hb1, hb2] = highPass.b
  const [ha1, ha2] = highPass.a
  let x1 = 0
  let x2 = 0
  let m1 = 0
  let m2 = 0
  let y1 = 0
  let y2 = 0
  let i = 0
  for (let s = 0; s < steps; s++) {
    let sum = 0
    for (const end = i + step; i < end; i++) {
      const x = samples[i]
      const m = sb0 * x + sb1 * x1 + sb2 * x2 - sa1 * m1 - sa2 * m2
      const y = hb0 * m + hb1 * m1 + hb2 * m2 - ha1 * y1 - ha2 * y2
      x2 = x1
      x1 = x
      m2 = m1
      m1 = m
      y2 = y1
      y1 = y
      sum += y * y
    }
    energy[s] = sum
  }
  return energy
}

/**
 * Integrated loudness in LUFS per ITU-R BS.1770-4: K-weighting, 400 ms blocks every 100 ms,
 * an absolute gate at −70 LUFS, then a relative gate 10 LU below the loudness of the blocks that
 * passed it. Returns −Infinity when no block passes (silence, or shorter than one block).
 * The 100 ms step is rounded to whole samples, which is exact at all common rates.
 */
export function integratedLoudness(
  channels: readonly Float32Array[],
  sampleRate: number,
  weights: readonly number[] = channelWeights(channels.length),
): number {
  const { shelf, highPass } = kWeighting(sampleRate)
  const step = Math.round(sampleRate / 10)
  const stepEnergies = channels.map((channel) =>
    kWeightedStepEnergy(channel, shelf, highPass, step),
  )
  const blockCount = (stepEnergies[0]?.length ?? 0) - BLOCK_STEPS + 1
  if (blockCount <= 0) return -Infinity

  // Weighted mean square of each block, summed over channels.
  const blockPower = new Float64Array(blockCount)
  const blockSamples = step * BLOCK_STEPS
  stepEnergies.forEach((energy, c) => {
    const weight = weights[c] ?? 1
    if (weight === 0) return
    for (let j = 0; j < blockCount; j++) {
      let window = 0
      for (let s = j; s < j + BLOCK_STEPS; s++) window += energy[s]
      blockPower[j] += (weight * window) / blockSamples
    }
  })

  const toLufs = (power: number) => LOUDNESS_OFFSET + 10 * Math.log10(power)
  const absoluteGate = 10 ** ((ABSOLUTE_GATE_LUFS - LOUDNESS_OFFSET) / 10)
  const gatedMean = (threshold: number) => {
    let sum = 0
    let count = 0
    for (let j = 0; j < blockCount; j++) {
      if (blockPower[j] > threshold) {
        sum += blockPower[j]
        count++
      }
    }
    return count === 0 ? 0 : sum / count
  }
  const ungated = gatedMean(absoluteGate)
  if (ungated === 0) return -Infinity
  const relativeGate = Math.max(absoluteGate, ungated * 10 ** (RELATIVE_GATE_LU / 10))
  return toLufs(gatedMean(relativeGate))
}
