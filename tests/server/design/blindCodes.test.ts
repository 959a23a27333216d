import { describe, expect, it } from 'vitest'
import {
  BLIND_CODE_SPACE,
  blindCodes,
  DesignError,
  isObviousCode,
} from '../../../server/design/index.ts'

// Random three-digit codes for samples are common practice in sensory testing; ISO 13299
// (sensory profiling) asks for three-digit codes (from memory). Keeping codes such as 111 or
// 123 out is common practice too: such codes invite guesses.

describe('blindCodes', () => {
  it('gives distinct three-digit codes without a leading zero', () => {
    const codes = blindCodes(300, 'session-codes')
    expect(new Set(codes).size).toBe(300)
    for (const code of codes) {
      expect(Number.isInteger(code)).toBe(true)
      expect(code).toBeGreaterThanOrEqual(100)
      expect(code).toBeLessThanOrEqual(999)
    }
  })

  it('gives the same codes for the same seed and other codes for another', () => {
    expect(blindCodes(40, 'a')).toEqual(blindCodes(40, 'a'))
    expect(blindCodes(40, 'a')).not.toEqual(blindCodes(40, 'b'))
  })

  it('keeps a prefix when more codes are asked for later', () => {
    expect(blindCodes(50, 'grow').slice(0, 20)).toEqual(blindCodes(20, 'grow'))
  })

  it('avoids codes already taken', () => {
    const taken = blindCodes(500, 'taken')
    const fresh = blindCodes(400, 'other', taken)
    expect(new Set([...taken, ...fresh]).size).toBe(900)
  })

  it('keeps obvious codes out while ordinary ones remain', () => {
    const obvious = Array.from({ length: 900 }, (_, i) => 100 + i).filter(isObviousCode)
    const plain = 900 - obvious.length
    expect(blindCodes(plain, 'plain').some(isObviousCode)).toBe(false)
    expect(blindCodes(plain + 1, 'plain').filter(isObviousCode)).toHaveLength(1)
  })

  it('spreads the codes over the whole range rather than counting up', () => {
    const codes = blindCodes(20, 'spread')
    expect(codes).not.toEqual([...codes].sort((a, b) => a - b))
    expect(Math.max(...codes) - Math.min(...codes)).toBeGreaterThan(400)
  })

  it('can hand out all 900 codes and refuses a 901st with a clear message', () => {
    expect(new Set(blindCodes(BLIND_CODE_SPACE, 'all')).size).toBe(900)
    expect(() => blindCodes(901, 'all')).toThrow(DesignError)
    expect(() => blindCodes(901, 'all')).toThrow(/at most 900 three-digit blind codes/)
    expect(() => blindCodes(2, 'all', blindCodes(899, 'x'))).toThrow(/1 are free/)
  })
})

describe('isObviousCode', () => {
  it('flags repeated digits and runs, and nothing else', () => {
    for (const code of [111, 666, 999, 123, 789, 987, 210, 321]) {
      expect(isObviousCode(code)).toBe(true)
    }
    for (const code of [100, 112, 135, 482, 890, 901, 124]) expect(isObviousCode(code)).toBe(false)
    // 9 repdigits, 7 rising runs (123…789), 8 falling runs (210…987).
    const all = Array.from({ length: 900 }, (_, i) => 100 + i)
    expect(all.filter(isObviousCode)).toHaveLength(24)
  })
})
