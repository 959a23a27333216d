import { DesignError } from './errors.ts'
import { createRandom, shuffle, type Seed } from './random.ts'

export const BLIND_CODE_MIN = 100
export const BLIND_CODE_MAX = 999
/** Every three-digit code without a leading zero. */
export const BLIND_CODE_SPACE = BLIND_CODE_MAX - BLIND_CODE_MIN + 1

/**
 * Codes that invite a guess or a mood: all digits alike (111, 666) and runs of consecutive
 * digits (123, 987). Avoiding codes that carry meaning is common practice in sensory
 * testing; they are used only once every ordinary code is taken.
 */
export function isObviousCode(code: number): boolean {
  const [a, b, c] = String(code).split('').map(Number)
  if (a === b && b === c) return true
  return (b - a === 1 && c - b === 1) || (a - b === 1 && b - c === 1)
}

/**
 * `count` distinct random three-digit codes (100–999), none of them in `taken`. The same seed
 * gives the same codes. A code says nothing about what it hides, so players cannot read a
 * recipe or an order from it.
 */
export function blindCodes(count: number, seed: Seed, taken: Iterable<number> = []): number[] {
  if (!Number.isInteger(count) || count < 0) {
    throw new DesignError(`The number of blind codes must be a whole number, got ${count}`)
  }
  const used = new Set(taken)
  const all = Array.from({ length: BLIND_CODE_SPACE }, (_, i) => BLIND_CODE_MIN + i).filter(
    (code) => !used.has(code),
  )
  if (count > all.length) {
    throw new DesignError(
      `A session can hold at most ${BLIND_CODE_SPACE} three-digit blind codes; ` +
        `${count} were asked for and ${all.length} are free`,
    )
  }
  const random = createRandom(seed)
  const plain = shuffle(
    all.filter((code) => !isObviousCode(code)),
    random,
  )
  const obvious = shuffle(all.filter(isObviousCode), random)
  return [...plain, ...obvious].slice(0, count)
}
