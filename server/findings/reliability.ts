/*
 * How reliable each player was on repeated trials, listing everyone who answered so that a
 * player with no repeats can still be excluded.
 */
import { reliability, type Rating } from '../analysis/index.ts'
import type { ReliabilityFindings } from '../../shared/schemas/findings'
import type { SessionPlayer } from './data'

export function reliabilityFindings(
  ratings: Rating[],
  players: SessionPlayer[],
): ReliabilityFindings {
  const engine = reliability(ratings)
  const byCode = new Map(engine.players.map((p) => [String(p.player), p]))
  return {
    rule: engine.rule,
    // Every player who answered is listed, so one with no repeats can still be excluded.
    players: players
      .filter(
        (p) => p.started || byCode.has(p.code) || p.exclusionReason !== null || p.headphoneFailed,
      )
      .map((p) => {
        const r = byCode.get(p.code)
        return {
          playerCode: p.code,
          duplicatePairs: r?.duplicatePairs ?? 0,
          misses: r?.misses ?? 0,
          missShare: r?.missShare ?? null,
          looSpearman: r?.panelAgreement ?? null,
          flagged: r?.flagged ?? false,
          excluded: p.exclusionReason !== null,
          exclusionReason: p.exclusionReason,
          headphoneFailed: p.headphoneFailed,
          reason: r ? r.reason : 'no line-scale ratings from this player',
        }
      }),
  }
}
