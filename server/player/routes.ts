import type { Response } from 'express'
import type { AppContext } from '../context'
import { route, type RouteDef } from '../http/routeTable'
import { sendAudio } from '../http/sendAudio'
import { confirmLevel, giveConsent, playerState } from './progress'
import { recordHeadphoneCheck, startHeadphoneCheck } from './headphone'
import { playerPlanView } from './plan'
import { playerAudioBytes } from './audio'
import { saveAnswer } from './saveAnswer'
import { audioRefParam, noToken, trialParam } from './schemas'
import { playerLinkHeaders } from '../../shared/schemas/sessions'
import { headphoneCheckBody, saveAnswerBody, tokenBody } from '../../shared/schemas/rating'

/** Player answers are personal and change as they go: no shared or stored copies. */
const json = (res: Response, body: unknown) => {
  res.setHeader('Cache-Control', 'no-store')
  res.json(body)
}

/** The player's way through a session, authenticated by the invitation token. */
export function playerFlowRoutes(ctx: AppContext): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/state',
      roles: 'public',
      headers: playerLinkHeaders,
      onInvalid: { headers: noToken },
      handler: async (_req, res, { headers }) => json(res, await playerState(ctx, headers.token)),
    }),
    route({
      method: 'post',
      path: '/consent',
      roles: 'public',
      body: tokenBody,
      handler: async (_req, res, { body }) => json(res, await giveConsent(ctx, body.token)),
    }),
    route({
      method: 'post',
      path: '/headphone/start',
      roles: 'public',
      body: tokenBody,
      handler: async (_req, res, { body }) => json(res, await startHeadphoneCheck(ctx, body.token)),
    }),
    route({
      method: 'post',
      path: '/headphone',
      roles: 'public',
      body: headphoneCheckBody,
      handler: async (_req, res, { body: { token, ...check } }) =>
        json(res, await recordHeadphoneCheck(ctx, token, check)),
    }),
    route({
      method: 'post',
      path: '/level',
      roles: 'public',
      body: tokenBody,
      handler: async (_req, res, { body }) => json(res, await confirmLevel(ctx, body.token)),
    }),
    route({
      method: 'get',
      path: '/plan',
      roles: 'public',
      headers: playerLinkHeaders,
      onInvalid: { headers: noToken },
      handler: async (_req, res, { headers }) =>
        json(res, { plan: await playerPlanView(ctx, headers.token) }),
    }),
    route({
      method: 'get',
      path: '/audio/:ref',
      roles: 'public',
      params: audioRefParam,
      handler: async (req, res, { params }) => {
        sendAudio(req, res, await playerAudioBytes(ctx, params.ref))
      },
    }),
    route({
      method: 'put',
      path: '/answers/:trialIndex',
      roles: 'public',
      params: trialParam,
      body: saveAnswerBody,
      handler: async (_req, res, { params, body }) =>
        json(res, await saveAnswer(ctx, body.token, params.trialIndex, body.answer)),
    }),
  ]
}
