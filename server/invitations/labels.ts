import { formatOf } from '../formats/index.ts'
import QRCode from 'qrcode'
import type { AppContext } from '../context'
import { conflict } from '../errors'
import { designOf, loadSession } from '../sessions/rows'
import { sessionServedTrials } from '../sessions/servedRecord'
import { invitationUrl, type InvitationDbRow } from './rows'
import { STRING_FITTING_CAUTION } from '../../shared/cautions'
import type { LabelSheet } from '../../shared/schemas/sessions'

/** A QR code as SVG markup; medium error correction survives a crease in a paper label. */
export function qrSvg(text: string): Promise<string> {
  return QRCode.toString(text, { type: 'svg', errorCorrectionLevel: 'M', margin: 2 })
}

/**
 * The play-test's printable sheet: for each invited player the coded sets in the order they
 * are to be played, each with a QR code that opens the rating form for that set, and the
 * packing list that tells staff which recipe goes into which coded envelope.
 */
export async function labelSheet(ctx: AppContext, sessionId: number): Promise<LabelSheet> {
  const session = await loadSession(ctx.knex, sessionId)
  const format = formatOf(session.format)
  // Labels go on physical sets; a listening session has none.
  if (format.codes.of !== 'set') throw conflict('Labels are printed for play-test sessions only')
  const served = await sessionServedTrials(ctx.knex, session)
  const recipeIds = designOf(session).recipeIds
  const recipes: { id: number; name: string; version: number }[] = await ctx
    .knex('recipes')
    .whereIn('id', recipeIds)
    .select('id', 'name', 'version')
  const recipeName = new Map(
    recipes.map((r) => [r.id, r.version > 1 ? `${r.name} v${r.version}` : r.name]),
  )
  const invitations: (InvitationDbRow & { code: string; name: string | null })[] = await ctx
    .knex('invitations as i')
    .join('players as p', 'p.id', 'i.player_id')
    .where('i.session_id', sessionId)
    .whereNull('i.revoked_at')
    .orderBy('i.player_index')
    .select('i.*', 'p.code', 'p.name')
  const players = []
  for (const inv of invitations) {
    const trials = served.get(inv.id) ?? []
    const link = invitationUrl(ctx, inv, session)
    const sets = []
    const packing = []
    for (const [i, t] of trials.entries()) {
      const code = format.setCode(t)
      if (code === null || !('recipeId' in t)) continue
      const url = `${link}?set=${code}`
      sets.push({ code, position: i + 1, url, qrSvg: await qrSvg(url) })
      packing.push({
        code,
        position: i + 1,
        recipeName: recipeName.get(Number(t.recipeId)) ?? `Recipe ${t.recipeId}`,
      })
    }
    players.push({ playerCode: inv.code, playerName: inv.name, sets, packing })
  }
  return { players, caution: STRING_FITTING_CAUTION }
}
