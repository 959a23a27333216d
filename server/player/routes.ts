import type { Response } from 'express'
import { z } from 'zod'
import type { AppContext } from '../context'
import type { RouteDef } from '../http/routeTable'
import { invalidToken } from '../errors'
import { sendAudio } from '../http/sendAudio'
import { parse } from '../http/validate'
import { confirmLevel, giveConsent, playerState, recordHeadphoneCheck } from './progress'
import { playerPlanView } from './plan'
import { playerAudioBytes } from './audio'
import { saveAnswer } from './saveAnswer'
import { playerLinkQuery } from '../../shared/schemas/sessions'
import { headphoneCheckBody, saveAnswerBody, tokenBody } from '../../shared/schemas/rating'

const trialParam = z.object({
  trialIndex: z.coerce.number().int('A whole number').min(0, 'Trials count from 0').max(100_000),
})

function tokenOf(query: unknown): string {
  const parsed = playerLinkQuery.safeParse(query)
  if (!parsed.success) throw invalidToken('This link has no token: open it from your invitation.')
  return parsed.data.token
}

/** Player answers are personal and change as they go: no shared or stored copies. */
const json = (res: Response, body: unknown) => {
  res.setHeader('Cache-Control', 'no-store')
  res.json(body)
}

/** The player's way through a session, authenticated by the invitation token. */
export function playerFlowRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/state',
      roles: 'public',
      handler: async (req, res) => json(res, await playerState(ctx, tokenOf(req.query))),
    },
    {
      method: 'post',
      path: '/consent',
      roles: 'public',
      handler: async (req, res) => {
        const { token } = parse(tokenBody, req.body)
        json(res, await giveConsent(ctx, token))
      },
    },
    {
      method: 'post',
      path: '/headphone',
      roles: 'public',
      handler: async (req, res) => {
        const { token, ...check } = parse(headphoneCheckBody, req.body)
        json(res, await recordHeadphoneCheck(ctx, token, check))
      },
    },
    {
      method: 'post',
      path: '/level',
      roles: 'public',
      handler: async (req, res) => {
        const { token } = parse(tokenBody, req.body)
        json(res, await confirmLevel(ctx, token))
      },
    },
    {
      method: 'get',
      path: '/plan',
      roles: 'public',
      handler: async (req, res) =>
        json(res, { plan: await playerPlanView(ctx, tokenOf(req.query)) }),
    },
    {
      method: 'get',
      path: '/audio/:ref',
      roles: 'public',
      handler: async (req, res) => {
        sendAudio(req, res, await playerAudioBytes(ctx, String(req.params.ref)))
      },
    },
    {
      method: 'put',
      path: '/answers/:trialIndex',
      roles: 'public',
      handler: async (req, res) => {
        const { trialIndex } = parse(trialParam, req.params)
        const { token, answer } = parse(saveAnswerBody, req.body)
        json(res, await saveAnswer(ctx, token, trialIndex, answer))
      },
    },
  ]
}
