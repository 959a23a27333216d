import type { Knex } from 'knex'
import type { PlannedTrial } from '../design/index.ts'
import { planFor, playerFacing, sessionInput } from './plans'
import { formatOf } from '../formats/index.ts'
import { servingsOf } from '../formats/answers'
import type { SessionRow } from './rows'
import type { PreviewClip, PreviewTrial, SessionPreview } from '../../shared/schemas/sessions'

// The staff preview: what player N of a session will be shown, trial by trial, by blind code.

/**
 * One player's view of the session: codes and scales in serving order. Repeat marks, the odd
 * sample of a triangle and every recipe and clip id stay behind; `audioUrl` decides what
 * address a clip is served under (the staff preview uses the staff clip route).
 */
export async function sessionPreview(
  db: Knex,
  s: SessionRow,
  playerIndex: number,
  audioUrl: (clipId: number, code: number) => string,
): Promise<SessionPreview> {
  const input = await sessionInput(db, s)
  const plan = planFor(input, playerIndex)
  const clip = (c: { clipId: string | number; code: number }): PreviewClip => ({
    code: c.code,
    audioUrl: audioUrl(Number(c.clipId), c.code),
  })
  const format = formatOf(s.format)
  const trialOf = (t: PlannedTrial, index: number): PreviewTrial => ({
    index,
    kind: t.kind,
    clips: servingsOf(t).map(clip),
    setCode: format.setCode(t),
  })
  return { ...playerFacing(s), trials: plan.trials.map(trialOf) }
}
