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
 * The K-weighted, channel-weighted mean square of every 400 ms block (a block every 100 ms): what
 * the BS.1770 gates act on. The 100 ms step is rounded to whole samples, which is exact at all
 * common rates. Empty when the signal is shorter than one block.
 */
export function loudnessBlocks(
  channels: readonly Float32Array[],
  sampleRate: number,
  weights: readonly number[] = channelWeights(channels.length),
): Float64Array {
  const { shelf, highPass } = kWeighting(sampleRate)
  const step = Math.round(sampleRate / 10)
  const stepEnergies = channels.map((channel) =>
    kWeightedStepEnergy(channel, shelf, highPass, step),
  )
  const blockCount = Math.max(0, (stepEnergies[0]?.length ?? 0) - BLOCK_STEPS + 1)

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
  return blockPower
}

/**
 * The gated loudness of blocks from `loudnessBlocks`, as if the signal had been multiplied by a
 * linear gain whose square is `powerGain`: an absolute gate at −70 LUFS, then a relative gate
 * 10 LU below the loudness of the blocks that passed it. The filters are linear, so this is the
 * meter's reading of the scaled signal without filtering it again; only the gates see the
 * gain, which is why loudness is not simply linear in gain. −Infinity when no block passes.
 */
export function gatedLoudness(blockPower: Float64Array, powerGain = 1): number {
  const blockCount = blockPower.length
  if (blockCount === 0) return -Infinity
  const toLufs = (power: number) => LOUDNESS_OFFSET + 10 * Math.log10(power)
  const absoluteGate = 10 ** ((ABSOLUTE_GATE_LUFS - LOUDNESS_OFFSET) / 10)
  const gatedMean = (threshold: number) => {
    let sum = 0
    let count = 0
    for (let j = 0; j < blockCount; j++) {
      const power = blockPower[j] * powerGain
      if (power > threshold) {
        sum += power
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

/**
 * Integrated loudness in LUFS per ITU-R BS.1770-4: K-weighting, 400 ms blocks every 100 ms,
 * an absolute gate at −70 LUFS, then a relative gate 10 LU below the loudness of the blocks that
 * passed it. Returns −Infinity when no block passes (silence, or shorter than one block).
 */
export function integratedLoudness(
  channels: readonly Float32Array[],
  sampleRate: number,
  weights: readonly number[] = channelWeights(channels.length),
): number {
  return gatedLoudness(loudnessBlocks(channels, sampleRate, weights))
}
