import { ZxcvbnFactory } from '@zxcvbn-ts/core'
import * as common from '@zxcvbn-ts/language-common'
import * as en from '@zxcvbn-ts/language-en'

// The strength estimate behind the password rule: zxcvbn-ts with its common-password list and
// English word lists. The lists are large (about a megabyte), so only the server and the two
// pages where a password is chosen import this module; everything else reaches the rule through
// shared/passwordRule.ts, which has none of it.

export interface Strength {
  /** 0 (guessed at once) to 4 (very hard to guess), zxcvbn's own scale. */
  score: 0 | 1 | 2 | 3 | 4
  /** zxcvbn's advice in plain English, empty when it has none. */
  warning: string
  suggestions: string[]
  /** Some part of it is on the list of passwords people use most. */
  common: boolean
}

let factory: ZxcvbnFactory | null = null

/**
 * Estimates how hard a password is to guess. The user's own words (name, address) count as
 * known to an attacker. The word lists are ranked on first use, not on import.
 */
export function estimateStrength(password: string, userWords: string[] = []): Strength {
  factory ??= new ZxcvbnFactory({
    dictionary: { ...common.dictionary, ...en.dictionary },
    graphs: common.adjacencyGraphs,
    translations: en.translations,
    // Off: it makes each estimate about forty times slower (a quarter second), too slow to
    // follow typing, and the l33t and dictionary matchers already catch the usual variants.
    useLevenshteinDistance: false,
  })
  const result = factory.check(password, userWords)
  return {
    score: result.score,
    warning: result.feedback.warning ?? '',
    suggestions: result.feedback.suggestions,
    common: result.sequence.some(
      (m) => m.pattern === 'dictionary' && m.dictionaryName.startsWith('passwords'),
    ),
  }
}
