export {
  analyseClip,
  analyseClipFile,
  analyseDecoded,
  DEFAULT_MAX_SECONDS,
  SILENCE_DBFS,
} from './analyse.ts'
export type { AnalyseOptions, ClipAnalysis, ClipDecay, ClipKind } from './analyse.ts'
export { attackTime } from './attack.ts'
export type { AttackOptions, AttackResult } from './attack.ts'
export { spectralCentroid } from './centroid.ts'
export type { CentroidOptions } from './centroid.ts'
export { bandPass, decayTime, lossFactor, qualityFactor, schroederCurve } from './decay.ts'
export type { DecayOptions, DecayResult } from './decay.ts'
export { decodeAudio, decodeAudioFile } from './decode.ts'
export { decodeFlac, decodeFlacFile, readFlacStreamInfo } from './decodeFlac.ts'
export { decodeWav, decodeWavFile } from './decodeWav.ts'
export { AUDIO_ERROR_CODES, AudioError, isAudioError } from './errors.ts'
export type { AudioErrorCode } from './errors.ts'
export { encodeFlac } from './flacEncoder.ts'
export type { FlacEncodeOptions } from './flacEncoder.ts'
export { biquadGainDb, deriveKWeighting, K_WEIGHTING_48K, kWeighting } from './kWeighting.ts'
export type { Biquad, KWeighting } from './kWeighting.ts'
export { dbToGain, gainToDb, mixToMono, mixToMonoInPlace, samplePeakDbfs } from './level.ts'
export { fitChannels, fitLength, fitLengthInPlace, END_FADE_SECONDS } from './fitLength.ts'
export {
  gainForLoudness,
  LEVEL_AIM_LU,
  LEVEL_TOLERANCE_LU,
  loudnessAt,
  matchSetLevels,
} from './levelMatch.ts'
export type { GainSolution, SetLevelInput, SetLevels } from './levelMatch.ts'
export {
  blocksOfSteps,
  channelWeights,
  gatedLoudness,
  integratedLoudness,
  KWeightedSteps,
  loudnessBlocks,
  loudnessStep,
} from './loudness.ts'
export { waveformPeaks } from './peaks.ts'
export type { WaveformPeaks } from './peaks.ts'
export { estimateF0, yinFrame } from './pitch.ts'
export type { FramePitch, PitchEstimate, PitchOptions } from './pitch.ts'
export {
  DEFAULT_CEILING_DBFS,
  DEFAULT_TARGET_LUFS,
  matchedSetGains,
  renditionGain,
} from './rendition.ts'
export type { MatchedSetGains } from './rendition.ts'
export { resampleChannel, resampleChannels } from './resample.ts'
export {
  chooseSetFormat,
  framesAt,
  MAX_RENDITION_RATE,
  sameSetFormat,
  setFormatProblems,
} from './setFormat.ts'
export type { SetFormat, SetFormatProblem, SourceFormat } from './setFormat.ts'
export {
  levelInput,
  matchRenditionLevel,
  prepareRendition,
  renderMatchedSet,
  renditionLevel,
  writeMatchedRendition,
} from './setRendition.ts'
export type { MatchedSetRenditions, RenditionLevel, WrittenRendition } from './setRendition.ts'
export { sniffContainer } from './sniff.ts'
export type { AudioContainer } from './sniff.ts'
export * as synth from './synth.ts'
export type { DecodedAudio, DecodeOptions, SampleFormat } from './types.ts'
export { concatBytes, encodeWav, infoListChunk, pcmWavHeader } from './wavEncoder.ts'
export type { WavChunk, WavEncodeOptions } from './wavEncoder.ts'
export { writeRenditionWav, writeRenditionWavFile } from './wavWriter.ts'
export type { RenditionOptions } from './wavWriter.ts'
export { servingVariant } from './servingVariant.ts'
