import { kWeighting, type KWeighting } from './kWeighting.ts'

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
 * Energy of the K-weighted signal in consecutive steps of `step` samples, fed in parts of any
 * length (a whole channel at once, or a file as it is written). Both filter stages run in one
 * pass without storing the filtered signal: this loop is most of the cost of analysis. Samples
 * after the last whole step are not counted.
 */
export class KWeightedSteps {
  readonly energy: Float64Array
  private steps = 0
  private inStep = 0
  private sum = 0
  private x1 = 0
  private x2 = 0
  private m1 = 0
  private m2 = 0
  private y1 = 0
  private y2 = 0

  constructor(
    private readonly filter: KWeighting,
    private readonly step: number,
    /** Samples the channel will have in all, which fixes the number of steps. */
    frames: number,
  ) {
    this.energy = new Float64Array(Math.floor(frames / step))
  }

  push(samples: Float32Array): void {
    const { shelf, highPass } = this.filter
    const [sb0, sb1, sb2] = shelf.b
    const [sa1, sa2] = shelf.a
    const [hb0, hb1, hb2] = highPass.b
    const [ha1, ha2] = highPass.a
    const { step, energy } = this
    let { x1, x2, m1, m2, y1, y2, sum, inStep, steps } = this
    let i = 0
    while (i < samples.length && steps < energy.length) {
      const end = Math.min(samples.length, i + step - inStep)
      inStep += end - i
      for (; i < end; i++) {
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
      if (inStep === step) {
        energy[steps++] = sum
        sum = 0
        inStep = 0
      }
    }
    Object.assign(this, { x1, x2, m1, m2, y1, y2, sum, inStep, steps })
  }
}

/** The 100 ms step of the blocks, in whole samples (exact at all common rates). */
export const loudnessStep = (sampleRate: number) => Math.round(sampleRate / 10)

/**
 * The K-weighted, channel-weighted mean square of every 400 ms block (a block every 100 ms): what
 * the BS.1770 gates act on. Empty when the signal is shorter than one block.
 */
export function loudnessBlocks(
  channels: readonly Float32Array[],
  sampleRate: number,
  weights: readonly number[] = channelWeights(channels.length),
): Float64Array {
  const filter = kWeighting(sampleRate)
  const step = loudnessStep(sampleRate)
  const stepEnergies = channels.map((channel) => {
    const steps = new KWeightedSteps(filter, step, channel.length)
    steps.push(channel)
    return steps.energy
  })
  return blocksOfSteps(stepEnergies, step, weights)
}

/** Blocks (see loudnessBlocks) from each channel's step energies. */
export function blocksOfSteps(
  stepEnergies: readonly Float64Array[],
  step: number,
  weights: readonly number[] = channelWeights(stepEnergies.length),
): Float64Array {
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
