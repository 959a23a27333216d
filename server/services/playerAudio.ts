import type { AppContext } from '../context'
import { notFound } from '../errors'
import { deadlineEnd } from '../auth/invitationTokens'
import { GoneForAnswers } from './playerAccess'
import { mediaFolders, renditionPath } from './clipStorage'

const REF = /^[A-Za-z0-9_-]{20,40}$/

/**
 * The rendition behind an opaque audio address. The address is the player's only key here
 * (an audio element sends no token), so it stops working with the link it was made for.
 */
export async function playerAudioFile(ctx: AppContext, ref: string): Promise<string> {
  const row:
    | {
        rendition_file: string
        revoked_at: string | null
        token_id: string | null
        status: string
        deadline: string
      }
    | undefined = REF.test(ref)
    ? await ctx
        .knex('player_audio_refs as r')
        .join('invitations as i', 'i.id', 'r.invitation_id')
        .join('sessions as s', 's.id', 'i.session_id')
        .join('clips as c', 'c.id', 'r.clip_id')
        .where('r.ref', ref)
        .first('c.rendition_file', 'i.revoked_at', 'i.token_id', 's.status', 's.deadline')
    : undefined
  if (!row) throw notFound('That recording')
  if (row.revoked_at || !row.token_id)
    throw new GoneForAnswers('This invitation has been withdrawn by the organisers.')
  if (row.status !== 'open' || ctx.clock.now() >= deadlineEnd(row.deadline))
    throw new GoneForAnswers('This session has closed; its recordings are no longer served.')
  return renditionPath(mediaFolders(ctx.config.mediaDir), row.rendition_file)
}
