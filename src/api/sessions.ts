import type {
  InvitationRow,
  InviteResult,
  LabelSheet,
  PackingList,
  OpenSessionBody,
  PlannerQuery,
  PlannerResult,
  RemindAllResult,
  SessionPreview,
  SessionDesign,
  SessionDetail,
  SessionSummary,
  TimePointBody,
  UpdateSessionBody,
} from '@shared/schemas/sessions'
import { api } from './client'

export const sessionsApi = {
  list: () => api.get<{ sessions: SessionSummary[] }>('/sessions'),
  get: (id: number) => api.get<{ session: SessionDetail }>(`/sessions/${id}`),
  create: (body: SessionDesign) => api.post<{ session: SessionDetail }>('/sessions', body),
  update: (id: number, body: UpdateSessionBody) =>
    api.patch<{ session: SessionDetail }>(`/sessions/${id}`, body),
  open: (id: number, body: OpenSessionBody = {}) =>
    api.post<{ session: SessionDetail }>(`/sessions/${id}/open`, body),
  close: (id: number) => api.post<{ session: SessionDetail }>(`/sessions/${id}/close`),
  preview: (id: number, player: number) =>
    api.get<{ plan: SessionPreview }>(`/sessions/${id}/preview`, { player }),
  addTimePoint: (id: number, body: TimePointBody) =>
    api.post<{ session: SessionDetail }>(`/sessions/${id}/time-points`, body),
  invitations: (id: number) =>
    api.get<{ invitations: InvitationRow[] }>(`/sessions/${id}/invitations`),
  invite: (id: number, playerIds: number[]) =>
    api.post<InviteResult>(`/sessions/${id}/invitations`, { playerIds }),
  remindAll: (id: number) => api.post<RemindAllResult>(`/sessions/${id}/remind`),
  labels: (id: number) => api.get<LabelSheet>(`/sessions/${id}/labels`),
  packingList: (id: number) => api.get<PackingList>(`/sessions/${id}/packing-list`),
  planner: (query: PlannerQuery) =>
    api.get<PlannerResult>('/planner', query as Record<string, number>),
}

export const invitationsApi = {
  resend: (id: number) => api.post<{ invitation: InvitationRow }>(`/invitations/${id}/resend`),
  remind: (id: number) => api.post<{ invitation: InvitationRow }>(`/invitations/${id}/remind`),
  revoke: (id: number) => api.post<{ invitation: InvitationRow }>(`/invitations/${id}/revoke`),
}
