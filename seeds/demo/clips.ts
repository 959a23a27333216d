import type { Knex } from 'knex'
import { encodeWav, synth } from '../../server/audio/index.ts'
import { DEMO_STAFF } from '../../server/auth/demoAccounts'
import { measureRecording } from '../../server/clips/measure'
import type { ClipDeps } from '../../server/clips/balance'
import { storeClips, type PreparedClip } from '../../server/clips/intake'
import type { ClipKind } from '../../shared/schemas/clips'

/*
 * Demo recordings of Larchmere String Works' prototypes, made here rather than recorded: each
 * recipe's tone differs in how fast its upper harmonics fall away (brightness), how long the
 * plucked string rings (damping) and how quickly the bowed note speaks, so the measures in the
 * demo show the differences a real test is after.
 */

const RATE = 48_000

interface Voice {
  recipe: string
  /** Harmonic n has amplitude 1/n^rollOff: a damped string loses its upper partials sooner. */
  rollOff: number
  t60: number
  attack: number
}

const STRINGS: { f0: number; instrumentCode: string; stereo: boolean; voices: Voice[] }[] = [
  {
    f0: 440,
    instrumentCode: 'VN-3',
    stereo: false,
    voices: [
      { recipe: 'Aurel A bare', rollOff: 0.75, t60: 3.2, attack: 0.11 },
      { recipe: 'Aurel A light compound', rollOff: 1.0, t60: 2.4, attack: 0.085 },
      { recipe: 'Aurel A fibre wrap', rollOff: 1.2, t60: 1.9, attack: 0.07 },
      { recipe: 'Aurel A heavy compound', rollOff: 1.5, t60: 1.3, attack: 0.05 },
    ],
  },
  {
    f0: 146.83,
    instrumentCode: 'VC-1',
    stereo: true,
    voices: [
      { recipe: 'Tessel D round', rollOff: 0.9, t60: 3.6, attack: 0.12 },
      { recipe: 'Tessel D flat', rollOff: 1.3, t60: 2.5, attack: 0.09 },
    ],
  },
]

const PERFORMERS = [
  { code: 'PF-01', levelDb: -6, attackScale: 1 },
  { code: 'PF-02', levelDb: -9, attackScale: 1.25 },
]

/**
 * Excerpts recorded a second time by a performer, as a session's twins and hidden repeats
 * need: another performance of the same passage, its notes pushed and pulled a little (the
 * take lasts as long as the first), softer and slower to speak, so the two takes are different
 * recordings rather than one file served twice.
 */
const SECOND_TAKES = [
  { excerpt: 'scale', performer: 'PF-01' },
  { excerpt: 'phrase', performer: 'PF-02' },
]
const TAKE_TWO = { tempo: 1.04, levelDb: -0.7, attackScale: 1.15 }

// Semitones above the open string and seconds per note.
const SCALE = [0, 2, 4, 5, 7, 9, 11, 12].map((s) => [s, 0.45] as const)
const PHRASE = [
  [0, 0.6],
  [4, 0.4],
  [7, 0.8],
  [5, 0.6],
  [2, 1.3],
] as const

const EXCERPTS: { name: string; kind: ClipKind; bowStroke: string }[] = [
  { name: 'open string', kind: 'bowed', bowStroke: 'whole bows' },
  { name: 'scale', kind: 'bowed', bowStroke: 'détaché' },
  { name: 'phrase', kind: 'bowed', bowStroke: 'legato' },
  { name: 'pluck ring-out', kind: 'plucked', bowStroke: '' },
]

function notes(
  f0: number,
  voice: Voice,
  level: number,
  attack: number,
  seq: readonly (readonly [number, number])[],
  tempo = 1,
) {
  // Rubato that cancels out: notes alternately longer and shorter (an odd last note as written).
  const stretch = (i: number) =>
    i === seq.length - 1 && seq.length % 2 === 1 ? 1 : i % 2 === 0 ? tempo : 2 - tempo
  const parts = seq.map(([semitones, seconds], i) =>
    synth.bowedTone({
      f0: f0 * 2 ** (semitones / 12),
      seconds: seconds * stretch(i),
      attackSeconds: attack,
      harmonicAmplitudes: harmonics(voice.rollOff),
      peakDbfs: level,
    }),
  )
  const out = new Float32Array(parts.reduce((n, p) => n + p.length, 0))
  let offset = 0
  for (const p of parts) {
    out.set(p, offset)
    offset += p.length
  }
  return out
}

function harmonics(rollOff: number): number[] {
  return Array.from({ length: 12 }, (_, i) => 1 / (i + 1) ** rollOff)
}

/**
 * A plucked string left to ring: each harmonic decays on its own, upper ones sooner, and starts
 * weaker the more damped the recipe, so both the ring and the brightness follow the recipe.
 */
function ringOut(f0: number, voice: Voice, peakDbfs: number): Float32Array {
  const seconds = 4
  const delay = Math.round(0.1 * RATE)
  const out = new Float32Array(delay + seconds * RATE)
  harmonics(voice.rollOff)
    .slice(0, 8)
    .forEach((amplitude, i) => {
      const partial = synth.exponentialDecay({
        seconds,
        frequency: f0 * (i + 1),
        t60: voice.t60 / Math.sqrt(i + 1),
        peakDbfs: 20 * Math.log10(amplitude) + peakDbfs - 6,
      })
      for (let k = 0; k < partial.length; k++) out[delay + k] += partial[k]
    })
  const noise = synth.whiteNoise({ seconds: out.length / RATE, rmsDbfs: -84, seed: 5 })
  for (let k = 0; k < out.length; k++) out[k] += noise[k]
  return out
}

/** A short fade at the end, as a player lifting the bow; a hard cut would click. */
function fadeOut(samples: Float32Array, seconds = 0.08): Float32Array {
  const n = Math.min(samples.length, Math.round(seconds * RATE))
  for (let i = 0; i < n; i++) samples[samples.length - 1 - i] *= i / n
  return samples
}

function render(
  f0: number,
  voice: Voice,
  performer: (typeof PERFORMERS)[number],
  excerpt: string,
  take = { tempo: 1, levelDb: 0, attackScale: 1 },
) {
  const attack = voice.attack * performer.attackScale * take.attackScale
  const level = performer.levelDb + take.levelDb
  if (excerpt === 'pluck ring-out') return ringOut(f0, voice, level + 3)
  const silence = new Float32Array(Math.round(0.15 * RATE))
  const seq =
    excerpt === 'open string' ? ([[0, 3.2]] as const) : excerpt === 'scale' ? SCALE : PHRASE
  const body = notes(f0, voice, level, attack, seq, take.tempo)
  const out = new Float32Array(silence.length + body.length)
  out.set(body, silence.length)
  return fadeOut(out)
}

const slug = (s: string) => s.toLowerCase().replace(/[^a-z0-9]+/g, '-')

/**
 * Makes and stores the demo clips for the demo recipes that exist (a missing name is skipped).
 * Returns how many were stored.
 */
export async function seedDemoClips(deps: ClipDeps): Promise<number> {
  const knex: Knex = deps.knex
  const developer: { id: number; email: string } | undefined = await knex('users')
    .where({ email: DEMO_STAFF.find((s) => s.role === 'developer')?.email ?? '' })
    .first('id', 'email')
  const excerptIds = new Map<string, number>()
  for (const e of EXCERPTS) {
    const row: { id: number } | undefined = await knex('excerpts')
      .where({ name: e.name })
      .first('id')
    if (row) excerptIds.set(e.name, row.id)
  }

  const prepared: PreparedClip[] = []
  for (const string of STRINGS) {
    for (const voice of string.voices) {
      const recipe: { id: number; string_name: string } | undefined = await knex('recipes')
        .where({ name: voice.recipe })
        .orderBy('version', 'desc')
        .first('id', 'string_name')
      if (!recipe) continue
      for (const performer of PERFORMERS) {
        for (const excerpt of EXCERPTS) {
          const excerptId = excerptIds.get(excerpt.name)
          if (!excerptId) continue
          const again = SECOND_TAKES.some(
            (t) => t.excerpt === excerpt.name && t.performer === performer.code,
          )
          for (const take of again ? [1, 2] : [1]) {
            const mono = render(
              string.f0,
              voice,
              performer,
              excerpt.name,
              take === 2 ? TAKE_TWO : undefined,
            )
            // The second microphone a little quieter, as in a real stereo pair.
            const channels = string.stereo ? [mono, mono.map((v) => v * 0.9)] : [mono]
            const bytes = encodeWav(channels, RATE, { bitDepth: 16 })
            prepared.push({
              fields: {
                recipeId: recipe.id,
                excerptId,
                performerCode: performer.code,
                instrumentCode: string.instrumentCode,
                bowStroke: excerpt.bowStroke,
                stringPlayed: recipe.string_name,
                stringsAgeDays: 3,
                recordedOn: '2026-10-14',
                kind: excerpt.kind,
                notes: '',
              },
              originalName: `${slug(voice.recipe)}_${slug(excerpt.name)}_${performer.code}${take === 2 ? '_take2' : ''}.wav`,
              measured: await measureRecording(bytes, excerpt.kind),
              source: { bytes },
            })
          }
        }
      }
    }
  }
  if (prepared.length === 0) return 0
  await storeClips(
    deps,
    prepared,
    { userId: developer?.id ?? null, email: developer?.email ?? null },
    { action: 'clips.imported', details: { demo: true } },
  )
  return prepared.length
}
