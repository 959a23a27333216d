export type SampleFormat = 'pcm' | 'float'

/** Samples scaled to −1…1, one array per channel, as every measure in this folder expects. */
export interface DecodedAudio {
  container: 'wav' | 'rf64' | 'flac'
  sampleRate: number
  channels: Float32Array[]
  /** Bits that carry signal (a 24-bit recording in 32-bit slots reports 24). */
  bitDepth: number
  format: SampleFormat
}

export interface DecodeOptions {
  /** Longer recordings are refused from the header alone, before any sample is read. */
  maxSeconds?: number
}
