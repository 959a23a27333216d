import type {
  PlayerPlanView,
  PlayerState,
  SaveAnswerResult,
  TrialAnswer,
} from '@shared/schemas/rating'
import type { PlayerLanding } from '@shared/schemas/sessions'
import { INVITATION_HEADER } from '@shared/constants'
import type { HeadphoneDeal } from '@shared/headphoneCheck'
import { api, request } from './client'

// The invitation link's token is the player's only credential; it goes with every call, in a
// header on reads and in the body on writes, never in a URL that logs and history keep.
const withToken = (token: string) => ({ headers: { [INVITATION_HEADER]: token } })

export const playerApi = {
  landing: (token: string) =>
    api.get<PlayerLanding>('/player/invitation', undefined, withToken(token)),
  state: (token: string) => api.get<PlayerState>('/player/state', undefined, withToken(token)),
  consent: (token: string) => api.post<PlayerState>('/player/consent', { token }),
  /** The server deals each attempt's tones and scores the picks: the page never scores itself. */
  headphoneStart: (token: string) => api.post<HeadphoneDeal>('/player/headphone/start', { token }),
  headphone: (token: string, attempt: number, responses: number[]) =>
    api.post<PlayerState>('/player/headphone', { token, attempt, responses }),
  level: (token: string) => api.post<PlayerState>('/player/level', { token }),
  plan: (token: string) =>
    api
      .get<{ plan: PlayerPlanView }>('/player/plan', undefined, withToken(token))
      .then((r) => r.plan),
  saveAnswer: (token: string, trialIndex: number, answer: TrialAnswer) =>
    request<SaveAnswerResult>('PUT', `/player/answers/${trialIndex}`, {
      body: { token, answer },
      quiet401: true,
    }),
}
