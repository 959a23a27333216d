import type {
  PlayerPlanView,
  PlayerState,
  SaveAnswerResult,
  TrialAnswer,
} from '@shared/schemas/rating'
import type { PlayerLanding } from '@shared/schemas/sessions'
import { api, request } from './client'

// The invitation link's token is the player's only credential; it goes with every call.
export const playerApi = {
  landing: (token: string) => api.get<PlayerLanding>('/player/invitation', { token }),
  state: (token: string) => api.get<PlayerState>('/player/state', { token }),
  consent: (token: string) => api.post<PlayerState>('/player/consent', { token }),
  headphone: (token: string, correct: number, trials: number) =>
    api.post<PlayerState>('/player/headphone', { token, correct, trials }),
  level: (token: string) => api.post<PlayerState>('/player/level', { token }),
  plan: (token: string) =>
    api.get<{ plan: PlayerPlanView }>('/player/plan', { token }).then((r) => r.plan),
  saveAnswer: (token: string, trialIndex: number, answer: TrialAnswer) =>
    request<SaveAnswerResult>('PUT', `/player/answers/${trialIndex}`, {
      body: { token, answer },
      quiet401: true,
    }),
}
