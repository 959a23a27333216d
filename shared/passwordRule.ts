import { LIMITS } from './constants'
import type { Strength } from './passwordStrength'

// The one password rule, for the server, the first-admin seed and the pages where a password is
// chosen. The strength estimate is passed in, so this module carries no word lists: the server
// and those pages hand it estimateStrength from shared/passwordStrength.ts.

/** Fewest characters, runs of spaces counted as one (OWASP ASVS 4.0.3 §2.1.1). */
export const PASSWORD_MIN_CHARS = LIMITS.passwordMin
/** bcrypt reads only the first 72 bytes of a password; the rest would be silently ignored. */
export const PASSWORD_MAX_BYTES = 72
/** zxcvbn's "safely unguessable" and above: at least 10^8 guesses by its estimate. */
export const PASSWORD_MIN_SCORE = 3

/** Words anyone guessing at a Ringdown password tries first. */
const SERVICE_WORDS = ['ringdown']

export type StrengthEstimate = (password: string, userWords: string[]) => Strength

/** Whose password it is: their own name and address must not be in it. */
export interface PasswordOwner {
  email?: string | null
  name?: string | null
}

export const utf8Bytes = (s: string) => new TextEncoder().encode(s).length

/** Letters and digits only, lower case: "Ada Quill-feather" and "adaquillfeather" are the same. */
const plain = (s: string) => s.toLowerCase().replace(/[^\p{L}\p{N}]+/gu, '')

/** The owner's words as zxcvbn should know them: parts of the name and of the address. */
export function ownerWords(owner: PasswordOwner = {}): string[] {
  const local = owner.email?.split('@')[0] ?? ''
  const parts = `${owner.name ?? ''} ${local}`.split(/[^\p{L}\p{N}]+/u)
  return [...new Set(parts.map((p) => p.toLowerCase()).filter((p) => p.length >= 3))]
}

/** What is wrong with the password's length and make-up alone, without any estimate. */
export function shapeProblems(password: string): string[] {
  if (password.length > 0 && password.trim() === '')
    return ['Only spaces: use letters, digits or signs as well']
  const problems: string[] = []
  if (password.replace(/\s+/g, ' ').length < PASSWORD_MIN_CHARS)
    problems.push(`Too short: use at least ${PASSWORD_MIN_CHARS} characters`)
  if (utf8Bytes(password) > PASSWORD_MAX_BYTES)
    problems.push(
      `Longer than ${PASSWORD_MAX_BYTES} bytes: shorten it (a letter with an accent takes two bytes, many other signs three or four)`,
    )
  return problems
}

function ownerProblem(password: string, owner: PasswordOwner): string | null {
  const said = plain(password)
  const local = plain(owner.email?.split('@')[0] ?? '')
  const name = plain(owner.name ?? '')
  if (local.length >= 3 && said.includes(local)) return 'Contains your e-mail address: leave it out'
  if (name.length >= 3 && said.includes(name)) return 'Contains your name: leave it out'
  return null
}

function guessProblem(strength: Strength): string | null {
  if (strength.score >= PASSWORD_MIN_SCORE) return null
  const advice = [strength.warning, ...strength.suggestions].filter(Boolean)
  const lead = strength.common ? 'Too common' : 'Too easy to guess'
  return `${lead}. ${advice.length ? advice.join(' ') : 'Add a word or two that are less common.'}`
}

export interface PasswordJudgement {
  /** Every reason the password is refused; none means it is accepted. */
  problems: string[]
  /** zxcvbn's score, or null when the shape alone refuses it (no estimate is made). */
  score: Strength['score'] | null
}

/**
 * Judges a new password. The shape comes first: a password that is too short or too long is not
 * estimated at all.
 */
export function judgePassword(
  password: string,
  estimate: StrengthEstimate,
  owner: PasswordOwner = {},
): PasswordJudgement {
  const shape = shapeProblems(password)
  if (shape.length) return { problems: shape, score: null }
  const strength = estimate(password, [...ownerWords(owner), ...SERVICE_WORDS])
  const problem = ownerProblem(password, owner) ?? guessProblem(strength)
  return { problems: problem ? [problem] : [], score: strength.score }
}

/** Every reason the password is refused; none means it is accepted. */
export function passwordProblems(
  password: string,
  estimate: StrengthEstimate,
  owner: PasswordOwner = {},
): string[] {
  return judgePassword(password, estimate, owner).problems
}
