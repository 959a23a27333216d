/*
 * Who belongs to a subgroup, their answers, and the counts at the head of the findings page.
 * Like every section's figures these are pure: the same data and filter always give the same
 * page, which is what lets an exclusion "recompute at once".
 */
import type { Id } from '../analysis/index.ts'
import type { Instrument, PlayerLevel } from '../../shared/constants'
import type { FindingsSummary } from '../../shared/schemas/findings'
import type { ResolvedAnswers } from './answersToRatings'
import type { SessionPlayer } from './data'

export interface Subgroup {
  instrument?: Instrument
  level?: PlayerLevel
}

export const inSubgroup = (p: SessionPlayer, g: Subgroup) =>
  (!g.instrument || p.instruments.includes(g.instrument)) && (!g.level || p.level === g.level)

/** The resolved answers of the given players only. */
export function answersOf(r: ResolvedAnswers, players: ReadonlySet<Id>): ResolvedAnswers {
  const keep = <T extends { player: Id }>(list: T[]) => list.filter((x) => players.has(x.player))
  return {
    ratings: keep(r.ratings),
    preferences: keep(r.preferences),
    more: keep(r.more),
    triangles: keep(r.triangles),
    rows: r.rows && keep(r.rows),
  }
}

export function summaryOf(players: SessionPlayer[], answers: number): FindingsSummary {
  const done = players.filter((p) => p.done).length
  return {
    invited: players.length,
    done,
    inProgress: players.filter((p) => p.started && !p.done).length,
    excluded: players.filter((p) => p.exclusionReason !== null).length,
    answers,
    completion: players.length > 0 ? done / players.length : 0,
  }
}
