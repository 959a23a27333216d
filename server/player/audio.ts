import { readFile, stat } from 'node:fs/promises'
import type { AppContext } from '../context'
import { notFound } from '../errors'
import { deadlineEnd } from '../auth/invitationTokens'
import { GoneForAnswers } from './access'
import { mediaFolders, renditionPath } from '../clips/storage'
import { servingVariant } from '../audio/servingVariant'

const REF = /^[A-Za-z0-9_-]{20,40}$/

interface Serving {
  path: string
  invitationId: number
  excerptId: number
}

/**
 * The rendition behind an opaque audio address. The address is the player's only key here
 * (an audio element sends no token), so it stops working with the link it was made for.
 */
async function serving(ctx: AppContext, ref: string): Promise<Serving> {
  const row:
    | {
        rendition_file: string
        invitation_id: number
        excerpt_id: number
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
        .first(
          'c.rendition_file',
          'c.excerpt_id',
          'r.invitation_id',
          'i.revoked_at',
          'i.token_id',
          's.status',
          's.deadline',
        )
    : undefined
  if (!row) throw notFound('That recording')
  if (row.revoked_at || !row.token_id)
    throw new GoneForAnswers('This invitation has been withdrawn by the organisers.')
  if (row.status !== 'open' || ctx.clock.now() >= deadlineEnd(row.deadline))
    throw new GoneForAnswers('This session has closed; its recordings are no longer served.')
  return {
    path: renditionPath(mediaFolders(ctx.config.mediaDir), row.rendition_file),
    invitationId: row.invitation_id,
    excerptId: row.excerpt_id,
  }
}

/**
 * Every serving of one excerpt to one player is padded to the same size: a longer or shorter
 * download would otherwise tell a triangle's odd sample from its twins, or follow one recipe's
 * recording from trial to trial.
 */
async function paddedSize(ctx: AppContext, s: Serving): Promise<number> {
  const files: { rendition_file: string }[] = await ctx
    .knex('player_audio_refs as r')
    .join('clips as c', 'c.id', 'r.clip_id')
    .where({ 'r.invitation_id': s.invitationId, 'c.excerpt_id': s.excerptId })
    .distinct('c.rendition_file')
  const folders = mediaFolders(ctx.config.mediaDir)
  const sizes = await Promise.all(
    files.map((f) =>
      stat(renditionPath(folders, f.rendition_file)).then(
        (x) => x.size,
        () => 0,
      ),
    ),
  )
  return Math.max(0, ...sizes)
}

// Recently served variants, so the Range requests of one playback do not redo the work.
const recent = new Map<string, Uint8Array>()
const RECENT_MAX = 32

/**
 * The bytes of one serving: padded to its excerpt's size, with its own inaudible variation.
 * Each check of the link is made on every request; the padding and noise are worked out once
 * per address, since a session's recordings cannot change while it is open.
 */
export async function playerAudioBytes(ctx: AppContext, ref: string): Promise<Uint8Array> {
  const s = await serving(ctx, ref)
  const key = `${ref}:${s.path}`
  const hit = recent.get(key)
  if (hit) return hit
  const file = await readFile(s.path).catch(() => {
    throw notFound('That recording')
  })
  const bytes = servingVariant(new Uint8Array(file), ref, await paddedSize(ctx, s))
  recent.set(key, bytes)
  if (recent.size > RECENT_MAX) recent.delete(recent.keys().next().value!)
  return bytes
}
