import type { Rating } from '../analysis/index.ts'
import { lineScaleFindings } from '../findings/lineScale'
import { reliabilityFindings } from '../findings/reliability'
import type { SessionPlayer } from '../findings/data'
import { DEFAULT_ATTRIBUTES } from '../../shared/schemas/sessions/attributes'
import { connectionFor } from './findingsTask'

/*
 * A thread's first findings page would otherwise also pay for loading the code, opening the
 * database and the engine compiling the statistics' loops. When the pool starts, before the
 * server says it is ready, each thread loads the code, opens its connection and runs the rating
 * analyses once on a small invented panel. No session is read and the result is dropped: the
 * first page an analyst asks for is still read and computed afresh.
 */

const PLAYERS = 120
const RECIPES = 4
const REPEATS = 2

function inventedPanel(): { ratings: Rating[]; players: SessionPlayer[] } {
  // A fixed linear congruential sequence: the same panel every start.
  let s = 2026
  const next = () => (s = (s * 1103515245 + 12345) % 2147483648) / 2147483648
  const ratings: Rating[] = []
  const players: SessionPlayer[] = []
  for (let p = 0; p < PLAYERS; p++) {
    const code = `W${p}`
    players.push({
      playerId: p,
      code,
      level: 'professional',
      instruments: ['violin'],
      started: true,
      done: true,
      answered: RECIPES * REPEATS,
      exclusionReason: null,
      excludedBy: null,
      headphoneFailed: false,
    })
    for (let r = 0; r < RECIPES; r++)
      for (const [a, attribute] of DEFAULT_ATTRIBUTES.entries())
        for (let k = 0; k < REPEATS; k++)
          ratings.push({
            player: code,
            recipe: r,
            attribute: attribute.key,
            value: Math.round(Math.min(100, Math.max(0, 40 + 5 * r * (a + 1) + 20 * next()))),
            clip: r,
            item: r,
          })
  }
  return { ratings, players }
}

/** Runs the analyses once; answers how long it took, for the log. */
export async function warmUpTask(databaseFile: string | null): Promise<number> {
  const started = performance.now()
  const { ratings, players } = inventedPanel()
  const recipes = Array.from({ length: RECIPES }, (_, id) => ({ id, name: `Recipe ${id}` }))
  JSON.stringify({
    attributes: lineScaleFindings(ratings, recipes, DEFAULT_ATTRIBUTES, []),
    reliability: reliabilityFindings(ratings, players),
  })
  // The connection is opened (and SQLite's schema read) now; no session is read.
  if (databaseFile && databaseFile !== ':memory:')
    await connectionFor(databaseFile).raw('select count(*) from sessions')
  return performance.now() - started
}
