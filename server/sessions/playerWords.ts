/*
 * The check on the words players see (player title and player message): they may not name a
 * recipe of the session, its version label, or a word that would tell the session's recipes
 * apart. Pure: it is given the recipes and the texts, and says per field what it found.
 */

/** What of a recipe can give it away in a sentence. */
export interface RecipeWords {
  name: string
  version: number
  core: string
  windings: { material: string; profile: string }[]
  dampingKind: string
  dampingGrade: string
  dampingNotes: string
}

export interface PlayerTexts {
  playerTitle: string
  playerMessage: string
}

export type PlayerWordProblems = Partial<Record<keyof PlayerTexts, string[]>>

// Words too common to tell anything apart, even where only some recipes' notes use them.
const COMMON = new Set(
  `about above after again all also and any are around as at back be been before behind below
  between both but by can could did does down each either else even every few first for from
  had has have her here his how into its just last least less like many may might more most
  much must near neither next nor not now off once one only onto other our out over own per
  same second she should side since some still such than that the their them then there these
  they this those three through too two under until upon very via was well were what when
  where which while who why will with within without would yet you your none string strings
  set sets used uses using made make makes new old`.split(/\s+/),
)
const MIN_LENGTH = 3

/**
 * Lower case without accents, split at everything but letters and digits: "Aurel-A", "AUREL a"
 * and "aurel_a" all become ["aurel", "a"].
 */
export function foldTokens(text: string): string[] {
  return text
    .normalize('NFKD')
    .replace(/\p{M}+/gu, '')
    .toLowerCase()
    .split(/[^\p{L}\p{N}]+/u)
    .filter(Boolean)
}

/**
 * Where a folded phrase occurs in the text's tokens, as [from, to) token spans. Tokens are
 * compared run against run with the separators dropped, so "V-20", "v 20" and "V20" meet, but
 * never inside a word: "coat" is not found in "coated"; a plain plural is.
 */
function spansOf(phrase: string, tokens: string[]): [number, number][] {
  const joined = foldTokens(phrase).join('')
  if (!joined) return []
  const spans: [number, number][] = []
  for (let from = 0; from < tokens.length; from++) {
    let run = ''
    for (let to = from; to < tokens.length && run.length < joined.length; to++) {
      run += tokens[to]
      if (run === joined || run === `${joined}s` || run === `${joined}es`)
        spans.push([from, to + 1])
    }
  }
  return spans
}

/** The words of a recipe's construction, each as written (without edge punctuation). */
function constructionWords(r: RecipeWords): string[] {
  const fields = [
    r.core,
    ...r.windings.flatMap((w) => [w.material, w.profile]),
    r.dampingKind,
    r.dampingGrade,
    r.dampingNotes,
  ]
  // Hyphens and dots stay inside a word here ("V-20", "pre-stretched"); spaces and brackets end it.
  return fields.flatMap((f) => f.split(/[^\p{L}\p{N}\-.'_]+/u)).flatMap(wordOf)
}

const nameWords = (r: RecipeWords) => r.name.split(/\s+/).flatMap(wordOf)

function wordOf(raw: string): string[] {
  const word = raw.replace(/^[^\p{L}\p{N}]+|[^\p{L}\p{N}]+$/gu, '')
  const key = foldTokens(word).join('')
  if (key.length < MIN_LENGTH || /^\d+$/.test(key) || COMMON.has(key)) return []
  return [word]
}

const foldKey = (word: string) => foldTokens(word).join('')

interface Word {
  word: string
  /** Recipes whose construction (or name) has it: some, never all. */
  recipes: string[]
  source: 'construction' | 'name'
}

/** Words that occur in some of the recipes but not in all: the ones that would tell them apart. */
function distinctiveWords(recipes: RecipeWords[]): Word[] {
  const found = new Map<string, Word>()
  // A name word every recipe is built with ("compound" when all have one) tells nothing either.
  const everywhere = new Set<string>()
  for (const source of ['construction', 'name'] as const) {
    const sets = recipes.map((r) => {
      const words = source === 'name' ? nameWords(r) : constructionWords(r)
      return new Map(words.map((w) => [foldKey(w), w]))
    })
    for (const [i, words] of sets.entries())
      for (const [key, word] of words) {
        const holders = sets.filter((s) => s.has(key)).length
        if (holders === recipes.length && source === 'construction') everywhere.add(key)
        if (holders === recipes.length || everywhere.has(key)) continue
        if (found.get(key)?.source === 'construction' && source === 'name') continue
        const entry = found.get(key) ?? { word, recipes: [], source }
        const label = labelOf(recipes[i])
        if (!entry.recipes.includes(label)) entry.recipes.push(label)
        found.set(key, entry)
      }
  }
  return [...found.values()]
}

const labelOf = (r: RecipeWords) => (r.version > 1 ? `${r.name} v${r.version}` : r.name)

const TELLS = 'players would know what they hear'
const APART = 'players could tell the strings apart'
const listed = (names: string[]) => names.map((n) => `'${n}'`).join(', ')

/** Each problem of one text, once, in the order found. */
function problemsOf(text: string, recipes: RecipeWords[], words: Word[]): string[] {
  const tokens = foldTokens(text)
  if (tokens.length === 0) return []
  const problems = new Set<string>()
  const covered = new Set<number>()
  const mark = ([from, to]: [number, number]) => {
    for (let i = from; i < to; i++) covered.add(i)
  }
  for (const r of recipes) {
    const spans = spansOf(r.name, tokens)
    spans.forEach(mark)
    if (spans.length) problems.add(`Names recipe '${r.name}': ${TELLS}`)
  }
  for (const r of recipes)
    for (const label of [`v${r.version}`, `version ${r.version}`]) {
      const spans = spansOf(label, tokens).filter(([from]) => !covered.has(from))
      spans.forEach(mark)
      if (spans.length)
        problems.add(`Names the version label '${label}' of recipe '${r.name}': ${TELLS}`)
    }
  for (const w of words) {
    const spans = spansOf(w.word, tokens).filter(([from, to]) => {
      for (let i = from; i < to; i++) if (!covered.has(i)) return true
      return false
    })
    if (spans.length === 0) continue
    const where = w.source === 'name' ? 'a word of the name of' : 'a construction word of'
    problems.add(
      `Uses '${w.word}', ${where} ${listed(w.recipes)} but not of every recipe here: ${APART}`,
    )
  }
  return [...problems]
}

/**
 * The problems of each player text, by field; an empty object when both may be shown. Only the
 * session's own recipes count, and only words that would tell them apart: a word every recipe
 * shares ("synthetic" when all cores are synthetic) gives nothing away.
 */
export function playerWordProblems(recipes: RecipeWords[], texts: PlayerTexts): PlayerWordProblems {
  const words = recipes.length > 1 ? distinctiveWords(recipes) : []
  const out: PlayerWordProblems = {}
  for (const field of ['playerTitle', 'playerMessage'] as const) {
    const problems = problemsOf(texts[field], recipes, words)
    if (problems.length) out[field] = problems
  }
  return out
}
