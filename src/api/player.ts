import type {
  PlayerPlanView,
  PlayerState,
  SaveAnswerResult,
  TrialAnswer,
} from '@shared/schemas/rating'
import type { PlayerLanding } from '@shared/schemas/sessions'
import type { HeadphoneDeal } from '@shared/headphoneCheck'
import { api, request } from './client'

// The invitation link's token is the player's only credential; it goes with every call.
export const playerApi = {
  landing: (token: string) => api.get<PlayerLanding>('/player/invitation', { token }),
  state: (token: string) => api.get<PlayerState>('/player/state', { token }),
  consent: (token: string) => api.post<PlayerState>('/player/consent', { token }),
  /** The server deals each attempt's tones and scores the picks: the page never scores itself. */
  headphoneStart: (token: string) => api.post<HeadphoneDeal>('/player/headphone/start', { token }),
  headphone: (token: string, attempt: number, responses: number[]) =>
    api.post<PlayerState>('/player/headphone', { token, attempt, responses }),
  level: (token: string) => api.post<PlayerState>('/player/level', { token }),
  plan: (token: string) =>
    api.get<{ plan: PlayerPlanView }>('/player/plan', { token }).then((r) => r.plan),
  saveAnswer: (token: string, trialIndex: number, answer: TrialAnswer) =>
    request<SaveAnswerResult>('PUT', `/player/answers/${trialIndex}`, {
      body: { token, answer },
      quiet401: true,
    }),
}
