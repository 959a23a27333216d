import { DesignError, type SessionDesignInput } from '../design/index.ts'
import { buildPlayerPlan, formatOf, sessionCodes } from '../formats/index.ts'
import { conflict } from '../errors'
import type { Knex } from 'knex'
import { clipRecipes, designInput, designOf, type SessionRow } from './rows'

// Plans built from a session's design: for fixing a new invitation's served record, for the
// staff preview and for trial counts. Answers are never read through these; they are read
// through the served record (servedRecord.ts).

/** A session's design ready to plan from, with clips paired to recipes from the database. */
export async function sessionInput(db: Knex, s: SessionRow) {
  const design = designOf(s)
  return designInput(design, await clipRecipes(db, design.clipSets))
}

/**
 * A stored design can stop being playable when a clip it uses is deleted; that is a conflict
 * to show the designer, not a server fault.
 */
export function planFor(input: SessionDesignInput, playerIndex: number) {
  try {
    return buildPlayerPlan(input, playerIndex, sessionCodes(input))
  } catch (err) {
    if (err instanceof DesignError)
      throw conflict(`This session's design can no longer be played: ${err.message}`)
    throw err
  }
}

/** Trials per player: the same for every player of a session. */
export async function trialCountOf(db: Knex, s: SessionRow): Promise<number> {
  return planFor(await sessionInput(db, s), 0).trials.length
}

/**
 * The words and scales a player is shown for a session, the same on the player's own page and
 * in the staff preview: a triangle asks only for the odd one, so it shows no attributes. The
 * words are the player title and message; the staff name and purpose never leave staff screens.
 */
export function playerFacing(s: SessionRow) {
  const format = formatOf(s.format)
  return {
    playerTitle: s.player_title,
    format: s.format,
    playerMessage: s.player_message,
    deadline: s.deadline,
    cautions: [...format.cautions],
    attributes: format.ratesAttributes ? designOf(s).attributes : [],
    allowNoPreference: format.noPreferenceOption && Boolean(s.allow_no_preference),
  }
}
