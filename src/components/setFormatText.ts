import type { AudioFormatFacts } from '@shared/schemas/sessions'

// One way of writing a recording's format wherever a set's takes and renditions are shown.

const channelWord = (n: number) => (n === 1 ? 'mono' : n === 2 ? 'stereo' : `${n} ch`)

export function audioFacts(f: AudioFormatFacts): string {
  return `${f.sampleRate / 1000} kHz · ${channelWord(f.channels)} · ${f.bitDepth}-bit · ${f.durationS.toFixed(1)} s`
}
