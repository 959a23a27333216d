import type { Knex } from 'knex'
import type { Seen, ServedAudio } from './walk'

// What would unblind a player, looked for in everything the walk kept. The facts to hide are
// read from the database, not from the code under test.

export interface Secrets {
  /** Lower-case strings that must appear nowhere a player can reach. */
  names: string[]
  /** Whole words (lower case) that must not appear in what a session's players read. */
  words: string[]
  clipIds: Set<number>
  recipeIds: Set<number>
}

const fold = (s: string) =>
  s
    .toLowerCase()
    .normalize('NFKD')
    .replace(/[^a-z0-9]+/g, ' ')
    .trim()

interface RecipeRow {
  id: number
  name: string
  version: number
  core: string
  windings: string
  damping_kind: string
  damping_grade: string
}

/**
 * The recipes' construction terms that tell some of `recipes` from the others: a core, a
 * winding's material or profile, a damping kind or grade held by some but not all of them.
 * Whole terms ("solid steel"), so a page's own words ("1px solid") are not mistaken for them.
 */
export function distinctiveWords(recipes: RecipeRow[]): string[] {
  const termsOf = (r: RecipeRow) => {
    const windings = (
      JSON.parse(r.windings || '[]') as { material?: string; profile?: string }[]
    ).flatMap((w) => [w.material ?? '', w.profile ?? ''])
    return new Set(
      [r.core, ...windings, r.damping_kind, r.damping_grade]
        .map(fold)
        .filter((w) => w.length >= 3 && w !== 'none'),
    )
  }
  const sets = recipes.map(termsOf)
  const all = new Set(sets.flatMap((s) => [...s]))
  return [...all].filter((w) => !sets.every((s) => s.has(w)))
}

/** Everything hidden from players of `sessionIds` (all sessions when not given). */
export async function secretsOf(knex: Knex, sessionIds?: number[]): Promise<Secrets> {
  const recipes: RecipeRow[] = await knex('recipes').select(
    'id',
    'name',
    'version',
    'core',
    'windings',
    'damping_kind',
    'damping_grade',
  )
  const clips: {
    id: number
    original_name: string
    original_file: string
    rendition_file: string
    performer_code: string
    instrument_code: string
    notes: string
  }[] = await knex('clips').select(
    'id',
    'original_name',
    'original_file',
    'rendition_file',
    'performer_code',
    'instrument_code',
    'notes',
  )
  const slug = (s: string) => s.toLowerCase().replace(/[^a-z0-9]+/g, '-')
  const names = [
    ...recipes.flatMap((r) => [
      r.name,
      slug(r.name),
      r.name.replace(/ /g, '_'),
      fold(r.name),
      `${r.name} v${r.version}`,
    ]),
    ...clips.flatMap((c) => [c.original_name, c.original_file, c.rendition_file]),
    ...clips.map((c) => c.original_name.replace(/\.[a-z0-9]+$/i, '')),
    ...clips.flatMap((c) => [c.performer_code, c.instrument_code]),
    ...clips.map((c) => c.notes).filter((n) => n.trim().length >= 6),
  ]
  // Staff words about sessions stay with staff: a name like "A vs B" says what is compared.
  const staff: { name: string; purpose: string; player_title: string }[] = await knex(
    'sessions',
  ).select('name', 'purpose', 'player_title')
  const titles = new Set(staff.map((s) => s.player_title.toLowerCase()))
  names.push(
    ...staff
      .flatMap((s) => [s.name, s.purpose])
      .filter((n) => n.trim().length >= 6 && !titles.has(n.toLowerCase())),
  )
  let words: string[] = []
  const sessions: { recipe_ids: string }[] = await knex('sessions')
    .modify((q) => (sessionIds ? q.whereIn('id', sessionIds) : q))
    .select('recipe_ids')
  for (const s of sessions) {
    const ids = JSON.parse(s.recipe_ids) as number[]
    words = [...words, ...distinctiveWords(recipes.filter((r) => ids.includes(r.id)))]
  }
  return {
    names: [...new Set(names.filter((n) => n.length >= 3))].map((n) => n.toLowerCase()),
    words: [...new Set(words)],
    clipIds: new Set(clips.map((c) => c.id)),
    recipeIds: new Set(recipes.map((r) => r.id)),
  }
}

const FORBIDDEN_KEY =
  /recipe|clip_?id|original|file|excerpt|performer|instrument_?code|repeat|odd_?index|seed|version|peaks/i
const ID_KEY = /(^id$|Id$|_id$|^ref$)/

function keysAndIds(value: unknown, path: string, problems: string[], secrets: Secrets) {
  if (Array.isArray(value)) {
    value.forEach((v, i) => keysAndIds(v, `${path}[${i}]`, problems, secrets))
    return
  }
  if (value === null || typeof value !== 'object') return
  const record = value as Record<string, unknown>
  // A served clip carries its code and address, nothing of its own to look at or measure.
  if ('code' in record && 'audioUrl' in record) {
    const extra = Object.keys(record).filter((k) => k !== 'code' && k !== 'audioUrl')
    if (extra.length) problems.push(`${path}: a served clip carries ${extra.join(', ')}`)
  }
  for (const [key, v] of Object.entries(record)) {
    if (FORBIDDEN_KEY.test(key)) problems.push(`${path}.${key}: a key that names hidden facts`)
    if (
      ID_KEY.test(key) &&
      typeof v === 'number' &&
      (secrets.clipIds.has(v) || secrets.recipeIds.has(v))
    )
      problems.push(`${path}.${key}: a clip or recipe id`)
    keysAndIds(v, `${path}.${key}`, problems, secrets)
  }
}

function chunkIds(bytes: Buffer): string[] {
  const ids: string[] = []
  for (let at = 12; at + 8 <= bytes.length;) {
    const id = bytes.toString('latin1', at, at + 4)
    const size = bytes.readUInt32LE(at + 4)
    ids.push(id)
    at += 8 + size + (size % 2)
  }
  return ids
}

/** Names, words, keys and ids in any text, JSON body or header a player received. */
export function textProblems(seen: Seen[], secrets: Secrets): string[] {
  const problems: string[] = []
  for (const s of seen) {
    const isAudio = s.bytes !== undefined && s.what.includes('/audio/')
    const text = isAudio ? '' : s.text
    const haystack = `${JSON.stringify(s.headers)}\n${text}`.toLowerCase()
    for (const name of secrets.names)
      if (haystack.includes(name)) problems.push(`${s.what}: shows "${name}"`)
    const words = ` ${fold(haystack)} `
    for (const word of secrets.words)
      if (words.includes(` ${word} `)) problems.push(`${s.what}: says "${word}"`)
    keysAndIds(s.json, s.what, problems, secrets)
    if (isAudio && s.status === 200 && !s.what.endsWith('range')) {
      const chunks = chunkIds(s.bytes!)
      if (chunks.join(',') !== 'fmt ,data') problems.push(`audio: chunks ${chunks.join(',')}`)
    }
    if (s.headers['content-disposition']) problems.push(`${s.what}: a Content-Disposition`)
    // JSON carries Express's hash of its own body; on audio a validator could pair two servings.
    if (isAudio && (s.headers.etag || s.headers['last-modified']))
      problems.push(`${s.what}: a validator`)
  }
  return problems
}

/** The words of mails sent to these addresses, as seen pages. */
export async function mailsTo(knex: Knex, emails: string[]): Promise<Seen[]> {
  const rows: { to: string; subject: string; text: string; html: string }[] = await knex('outbox')
    .whereIn('to', emails)
    .select('to', 'subject', 'text', 'html')
  return rows.map((m) => ({
    what: `mail "${m.subject}"`,
    status: 200,
    headers: { subject: m.subject },
    text: `${m.subject}\n${m.text}\n${m.html}`,
    json: null,
  }))
}

export interface WavFacts {
  rate: number
  channels: number
  bits: number
  dataBytes: number
  /** The first channel, as numbers in −1…1. */
  samples: Float64Array
}

/** Reads an integer PCM WAV by its published layout (RIFF/WAVE, fmt and data chunks). */
export function readWav(bytes: Buffer): WavFacts {
  let at = 12
  let rate = 0
  let channels = 0
  let bits = 0
  while (at + 8 <= bytes.length) {
    const id = bytes.toString('latin1', at, at + 4)
    const size = bytes.readUInt32LE(at + 4)
    if (id === 'fmt ') {
      channels = bytes.readUInt16LE(at + 10)
      rate = bytes.readUInt32LE(at + 12)
      bits = bytes.readUInt16LE(at + 22)
    }
    if (id === 'data') {
      const width = bits / 8
      const frames = Math.floor(size / (width * channels))
      const samples = new Float64Array(frames)
      for (let f = 0; f < frames; f++) {
        const p = at + 8 + f * width * channels
        samples[f] = (width === 2 ? bytes.readInt16LE(p) : bytes.readIntLE(p, 3)) / 2 ** (bits - 1)
      }
      return { rate, channels, bits, dataBytes: size, samples }
    }
    at += 8 + size + (size % 2)
  }
  throw new Error('no data chunk')
}

/** Pearson's correlation of two sample runs over their common length. */
export function correlation(a: Float64Array, b: Float64Array): number {
  const n = Math.min(a.length, b.length)
  let ma = 0
  let mb = 0
  for (let i = 0; i < n; i++) {
    ma += a[i]
    mb += b[i]
  }
  ma /= n
  mb /= n
  let sab = 0
  let saa = 0
  let sbb = 0
  for (let i = 0; i < n; i++) {
    sab += (a[i] - ma) * (b[i] - mb)
    saa += (a[i] - ma) ** 2
    sbb += (b[i] - mb) ** 2
  }
  return sab / Math.sqrt(saa * sbb)
}

/** Headers and lengths that differ between the servings of one trial, or of one screen. */
export function formatProblems(audio: ServedAudio[]): string[] {
  const problems: string[] = []
  const groups = new Map<string, ServedAudio[]>()
  for (const a of audio) {
    for (const key of [`trial ${a.trial}`, `screen ${a.screen}`])
      groups.set(key, [...(groups.get(key) ?? []), a])
  }
  for (const [key, servings] of groups) {
    const facts = servings.map((s) => {
      const w = readWav(s.bytes)
      return `${w.rate} Hz, ${w.channels} ch, ${w.bits} bit, ${w.dataBytes} bytes, ${s.bytes.length} in all`
    })
    if (new Set(facts).size > 1)
      problems.push(`${key}: servings differ: ${[...new Set(facts)].join(' | ')}`)
  }
  return problems
}

interface ServedTrial {
  repeatOf: number | null
  servings: { code: number; recipeId: number }[]
}

/**
 * Two servings of one recipe (in a trial, or a repeat and its first showing) that decode to
 * nearly the same samples: a short script would pair them. Allowed only where the designer
 * accepted the single-take warning.
 */
export function twinProblems(
  audio: ServedAudio[],
  served: ServedTrial[],
  accepted: boolean,
  options: { repeatsShowTheSame: boolean; limit?: number } = { repeatsShowTheSame: true },
): { problems: string[]; pairs: number; highest: number } {
  const bytesOf = new Map(audio.map((a) => [`${a.trial}/${a.code}`, a.bytes]))
  const problems: string[] = []
  let pairs = 0
  let highest = -1
  const compare = (ta: number, ca: number, tb: number, cb: number) => {
    const a = bytesOf.get(`${ta}/${ca}`)
    const b = bytesOf.get(`${tb}/${cb}`)
    if (!a || !b) return
    const r = correlation(readWav(a).samples, readWav(b).samples)
    pairs++
    highest = Math.max(highest, r)
    if (r > (options.limit ?? 0.999) && !accepted)
      problems.push(
        `codes ${ca} (trial ${ta}) and ${cb} (trial ${tb}) correlate at ${r.toFixed(6)}`,
      )
  }
  served.forEach((t, i) => {
    for (let x = 0; x < t.servings.length; x++)
      for (let y = x + 1; y < t.servings.length; y++)
        if (t.servings[x].recipeId === t.servings[y].recipeId)
          compare(i, t.servings[x].code, i, t.servings[y].code)
    // A rating's or pair's repeat shows its first showing's stimulus again: by its second take.
    // A triangle's repeat is a new triangle of the same recipes (the other one doubled), and two
    // takes cannot cover three servings of a recipe across the pair, so only its twins count.
    if (t.repeatOf !== null && options.repeatsShowTheSame) {
      const first = served[t.repeatOf]
      for (const s of t.servings)
        for (const f of first.servings)
          if (f.recipeId === s.recipeId) compare(t.repeatOf, f.code, i, s.code)
    }
  })
  return { problems, pairs, highest }
}
