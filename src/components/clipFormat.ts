import type { Clip } from '@shared/schemas/clips'

// One way of writing each measure wherever clips are shown.
const fixed = (v: number | null, digits: number, unit: string) =>
  v === null || !Number.isFinite(v) ? '—' : `${v.toFixed(digits)} ${unit}`

export const fmt = {
  lufs: (v: number | null) => fixed(v, 1, 'LUFS'),
  dbfs: (v: number | null) => fixed(v, 1, 'dBFS'),
  db: (v: number | null) => (v === null ? '—' : `${v >= 0 ? '+' : ''}${v.toFixed(1)} dB`),
  hz: (v: number | null) => fixed(v, v !== null && v < 100 ? 1 : 0, 'Hz'),
  seconds: (v: number | null) => fixed(v, 2, 's'),
  ms: (v: number | null) => (v === null ? '—' : `${Math.round(v * 1000)} ms`),
  lossFactor: (v: number | null) => (v === null ? '—' : v.toExponential(2)),
}

/** The one measure of damping or response a clip's kind has. */
export function responseMeasure(c: Clip): string {
  return c.kind === 'plucked' ? `T60 ${fmt.seconds(c.t60S)}` : `attack ${fmt.ms(c.attackS)}`
}

export function formatOf(c: Clip): string {
  return `${c.container.toUpperCase()} · ${c.bitDepth}-bit · ${c.sampleRate / 1000} kHz · ${
    c.channels === 1 ? 'mono' : c.channels === 2 ? 'stereo' : `${c.channels} ch`
  }`
}
