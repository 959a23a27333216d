import { formatOf } from '../formats/index.ts'
import QRCode from 'qrcode'
import type { AppContext } from '../context'
import { conflict } from '../errors'
import { designOf, loadSession, type SessionRow } from '../sessions/rows'
import { sessionServedTrials } from '../sessions/servedRecord'
import { invitationUrl, type InvitationDbRow } from './rows'
import { STRING_FITTING_CAUTION } from '../../shared/cautions'
import type { LabelSheet, PackingList } from '../../shared/schemas/sessions'

/** A QR code as SVG markup; medium error correction survives a crease in a paper label. */
export function qrSvg(text: string): Promise<string> {
  return QRCode.toString(text, { type: 'svg', errorCorrectionLevel: 'M', margin: 2 })
}

interface SetOfPlayer {
  code: number
  /** Order of fitting, from 1. */
  position: number
  recipeId: number
}

interface PlayerSets {
  inv: InvitationDbRow & { code: string; name: string | null }
  sets: SetOfPlayer[]
}

/** Each invited (not revoked) player of a play-test with their coded sets in playing order. */
async function playtestSets(ctx: AppContext, session: SessionRow): Promise<PlayerSets[]> {
  const format = formatOf(session.format)
  // Labels go on physical sets; a listening session has none.
  if (format.codes.of !== 'set') throw conflict('Labels are printed for play-test sessions only')
  const served = await sessionServedTrials(ctx.knex, session)
  const invitations: PlayerSets['inv'][] = await ctx
    .knex('invitations as i')
    .join('players as p', 'p.id', 'i.player_id')
    .where('i.session_id', session.id)
    .whereNull('i.revoked_at')
    .orderBy('i.player_index')
    .select('i.*', 'p.code', 'p.name')
  return invitations.map((inv) => ({
    inv,
    sets: (served.get(inv.id) ?? []).flatMap((t, i) => {
      const code = format.setCode(t)
      return code === null || !('recipeId' in t)
        ? []
        : [{ code, position: i + 1, recipeId: Number(t.recipeId) }]
    }),
  }))
}

/**
 * The play-test's labels, one sheet per invited player: the coded sets in the order they are to
 * be played, each with a QR code that opens the rating form for that set, under the player
 * title, with the fitting caution. These travel with the strings, so they carry no recipe and
 * no staff name; the key to the envelopes is the packing list, printed apart.
 */
export async function labelSheet(ctx: AppContext, sessionId: number): Promise<LabelSheet> {
  const session = await loadSession(ctx.knex, sessionId)
  const players = []
  for (const { inv, sets } of await playtestSets(ctx, session)) {
    const link = invitationUrl(ctx, inv, session)
    const labels = []
    for (const s of sets) {
      const url = `${link}?set=${s.code}`
      labels.push({ code: s.code, position: s.position, url, qrSvg: await qrSvg(url) })
    }
    players.push({ playerCode: inv.code, sets: labels })
  }
  return { playerTitle: session.player_title, players, caution: STRING_FITTING_CAUTION }
}

/** Staff only: which recipe goes into which coded envelope, for each player. */
export async function packingList(ctx: AppContext, sessionId: number): Promise<PackingList> {
  const session = await loadSession(ctx.knex, sessionId)
  const playerSets = await playtestSets(ctx, session)
  const recipes: { id: number; name: string; version: number }[] = await ctx
    .knex('recipes')
    .whereIn('id', designOf(session).recipeIds)
    .select('id', 'name', 'version')
  const recipeName = new Map(
    recipes.map((r) => [r.id, r.version > 1 ? `${r.name} v${r.version}` : r.name]),
  )
  return {
    sessionName: session.name,
    players: playerSets.map(({ inv, sets }) => ({
      playerCode: inv.code,
      playerName: inv.name,
      lines: sets.map((s) => ({
        code: s.code,
        position: s.position,
        recipeName: recipeName.get(s.recipeId) ?? `Recipe ${s.recipeId}`,
      })),
    })),
  }
}
