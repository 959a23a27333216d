import {
  buildPlayerPlan,
  DesignError,
  sessionCodes,
  type PlannedTrial,
  type SessionDesignInput,
} from '../design/index.ts'
import { conflict } from '../errors'
import { LISTENING_CAUTION, STRING_FITTING_CAUTION } from '../../shared/cautions'
import { clipRecipes, designInput, designOf, type SessionRow } from './sessionRows'
import type { Knex } from 'knex'
import type {
  PlayerClip,
  PlayerTrial,
  PlayerView,
  SessionFormat,
} from '../../shared/schemas/sessions'

export function cautionsFor(format: SessionFormat): string[] {
  return format === 'playtest' ? [STRING_FITTING_CAUTION] : [LISTENING_CAUTION]
}

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
 * One player's view of the session: codes and scales in serving order. Repeat marks, the odd
 * sample of a triangle and every recipe and clip id stay behind; `audioUrl` decides what
 * address a clip is served under (the staff preview uses the staff clip route).
 */
export async function playerView(
  db: Knex,
  s: SessionRow,
  playerIndex: number,
  audioUrl: (clipId: number, code: number) => string,
): Promise<PlayerView> {
  const input = await sessionInput(db, s)
  const plan = planFor(input, playerIndex)
  const clip = (c: { clipId: string | number; code: number }): PlayerClip => ({
    code: c.code,
    audioUrl: audioUrl(Number(c.clipId), c.code),
  })
  const trialOf = (t: PlannedTrial, index: number): PlayerTrial => {
    switch (t.kind) {
      case 'rating':
        return { index, kind: t.kind, clips: [clip(t.clip)], setCode: null }
      case 'pair':
        return { index, kind: t.kind, clips: [clip(t.a), clip(t.b)], setCode: null }
      case 'triangle':
        return { index, kind: t.kind, clips: t.samples.map(clip), setCode: null }
      case 'playtest':
        return { index, kind: t.kind, clips: [], setCode: t.code }
    }
  }
  const design = designOf(s)
  return {
    sessionName: s.name,
    format: s.format,
    instructions: s.instructions,
    deadline: s.deadline,
    cautions: cautionsFor(s.format),
    // A triangle asks only which sample is the odd one.
    attributes: s.format === 'triangle' ? [] : design.attributes,
    allowNoPreference: s.format === 'pair' && Boolean(s.allow_no_preference),
    trials: plan.trials.map(trialOf),
  }
}
