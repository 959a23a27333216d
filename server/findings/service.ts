import { formatOf } from '../formats/index.ts'
import type { Knex } from 'knex'
import { INSTRUMENTS, PLAYER_LEVELS } from '../../shared/constants'
import type { SessionFindings } from '../../shared/schemas/findings'
import { agingFindings, loadTimePoints } from './aging'
import { provenanceOf } from './provenance'
import { answersOf, inSubgroup, summaryOf, type Subgroup } from './summary'
import { lineScaleFindings } from './lineScale'
import { pairPreferences } from './preferences'
import { triangleFindings } from './triangle'
import { reliabilityFindings } from './reliability'
import { objectiveFindings } from './objective'
import { clipMeasures, loadFindingsData, type FindingsData } from './data'
import type { ResolvedAnswers } from './answersToRatings'
import { clipIdsOfSet, designOf } from '../sessions/rows'

export interface ComputedFindings {
  findings: SessionFindings
  data: FindingsData
}

/** The whole findings page for one session and subgroup, computed afresh from the answers. */
export async function computeSessionFindings(
  db: Knex,
  sessionId: number,
  group: Subgroup,
): Promise<ComputedFindings> {
  const data = await loadFindingsData(db, sessionId)
  const { session, recipes, attributes } = data
  const players = data.players.filter((p) => inSubgroup(p, group))
  // Copies only when someone is left out: on a large panel each copy is a hundred thousand rows.
  const all =
    players.length === data.players.length
      ? data.resolved
      : answersOf(data.resolved, new Set(players.map((p) => p.code)))
  const counted = players.filter((p) => p.exclusionReason === null)
  const kept =
    counted.length === players.length ? all : answersOf(all, new Set(counted.map((p) => p.code)))
  const excluded = players.filter((p) => p.exclusionReason !== null).map((p) => p.code)
  const format = session.format
  const adjustment = session.adjustment ?? 'holm'
  const parts = new Set(formatOf(format).findings)
  const answering = {
    readable: answeringPlayers(all),
    kept: answeringPlayers(kept),
  }
  const answersInGroup = players.reduce((sum, p) => sum + p.answered, 0)

  const clips = designOf(session).clipSets.flatMap(clipIdsOfSet)
  const timePoints = await loadTimePoints(db, session, group)
  const findings: SessionFindings = {
    session: {
      id: session.id,
      name: session.name,
      format,
      status: session.status,
      timePointLabel: session.time_point_label,
      adjustment,
    },
    summary: summaryOf(players, answersInGroup),
    filters: {
      instrument: group.instrument ?? null,
      level: group.level ?? null,
      available: {
        instruments: INSTRUMENTS.filter((i) => data.players.some((p) => p.instruments.includes(i))),
        levels: PLAYER_LEVELS.filter((l) => data.players.some((p) => p.level === l)),
      },
    },
    reason: topReason(answersInGroup, answering, data.answers),
    recipes,
    attributes: parts.has('attributes')
      ? lineScaleFindings(
          kept.ratings,
          recipes,
          attributes,
          excluded,
          adjustment,
          // Planning is for a session still collecting answers; a closed one has its panel.
          session.status === 'open'
            ? { targetDifference: session.target_difference ?? null }
            : null,
        )
      : [],
    preferences: parts.has('preferences')
      ? pairPreferences(kept, recipes, attributes, adjustment)
      : null,
    triangle: parts.has('triangle') ? triangleFindings(kept) : null,
    reliability: reliabilityFindings(all.ratings, players),
    objective: parts.has('objective')
      ? objectiveFindings(kept.ratings, await clipMeasures(db, clips), attributes)
      : [],
    aging: timePoints ? agingFindings(timePoints, recipes, attributes, adjustment) : null,
    provenance: await provenanceOf(db, data),
  }
  return { findings, data }
}

/** Players with at least one readable answer of any kind. */
function answeringPlayers(r: ResolvedAnswers): number {
  const players = new Set<unknown>()
  for (const list of [r.ratings, r.preferences, r.more, r.triangles])
    for (const x of list) players.add(x.player)
  return players.size
}

/** One line for the page head when there is nothing, or too little, to compare. */
function topReason(
  answersInGroup: number,
  answering: { readable: number; kept: number },
  answersInSession: number,
) {
  if (answersInSession === 0) return 'not enough data: no answers yet'
  if (answersInGroup === 0) return 'not enough data: nobody in this subgroup has answered'
  if (answering.readable === 0) return 'not enough data: no stored answer could be read'
  if (answering.kept === 0) return 'not enough data: every player who answered is excluded'
  if (answering.kept === 1)
    return answering.readable === 1
      ? 'not enough data: only one player has answered'
      : 'not enough data: only one player is left after exclusions'
  return null
}
