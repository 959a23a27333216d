import { blindCodes } from './blindCodes.ts'
import { DesignError } from './errors.ts'
import { deriveSeed } from './random.ts'
import type { Id, SessionDesignInput } from './types.ts'

export interface CodeEntry {
  /** A clip (listening formats) or a physical set of a recipe (play-test). */
  kind: 'clip' | 'set'
  id: Id
  /** Which showing: see `copiesPerItem`. */
  copy: number
  code: number
}

export interface SessionCodes {
  clip(clipId: Id, copy?: number): number
  set(recipeId: Id, copy?: number): number
  /** Every code and what it stands for: the staff-only key to the session. */
  entries: CodeEntry[]
}

/**
 * Codes each clip (or set) needs. A code belongs to a clip and a showing, not to a trial, so a
 * clip shows the same code to every player all session long. A triangle serves one clip
 * twice, and identical codes would point straight at the odd one, so the second serving has
 * its own code; a hidden duplicate shown under its first code would not be hidden, so repeats
 * have codes of their own too (copies 1, or 2 and 3 in a triangle).
 */
export function copiesPerItem(showings: number, duplicates: number): number {
  return duplicates > 0 ? 2 * showings : showings
}

/** What a code stands for in a format, and how many showings an item needs in a first pass. */
export interface CodeSpec {
  of: CodeEntry['kind']
  showings: number
}

const keyOf = (kind: CodeEntry['kind'], id: Id, copy: number) => JSON.stringify([kind, id, copy])

/**
 * The session's codes, drawn once from its seed (the design already checked). Keys are sorted before codes are dealt, so
 * the rows coming back from the database in another order cannot change anyone's codes.
 */
export function dealCodes(input: SessionDesignInput, spec: CodeSpec): SessionCodes {
  const copies = copiesPerItem(spec.showings, input.duplicates)
  const kind = spec.of
  const ids =
    kind === 'set'
      ? input.recipes
      : input.clipSets.flatMap((set) =>
          [...set.clips, ...(set.twins ?? [])].map((clip) => clip.clipId),
        )
  const keys = ids
    .flatMap((id) => Array.from({ length: copies }, (_, copy) => ({ id, copy })))
    .map((k) => ({ ...k, key: keyOf(kind, k.id, k.copy) }))
    .sort((x, y) => (x.key < y.key ? -1 : x.key > y.key ? 1 : 0))
  const codes = blindCodes(keys.length, deriveSeed(input.seed, 'codes'))
  const entries = keys.map((k, i) => ({ kind, id: k.id, copy: k.copy, code: codes[i] }))
  const byKey = new Map(keys.map((k, i) => [k.key, codes[i]]))
  const lookup =
    (wanted: CodeEntry['kind']) =>
    (id: Id, copy = 0) => {
      const code = byKey.get(keyOf(wanted, id, copy))
      if (code === undefined) {
        throw new DesignError(`No blind code for ${wanted} ${String(id)} (showing ${copy})`)
      }
      return code
    }
  return { clip: lookup('clip'), set: lookup('set'), entries }
}
