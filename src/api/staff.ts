import type { InviteUserBody, StaffUser, UpdateUserBody } from '@shared/schemas/users'
import { api } from './client'

export const staffApi = {
  list: () => api.get<{ users: StaffUser[] }>('/staff'),
  invite: (body: InviteUserBody) => api.post<{ user: StaffUser }>('/staff', body),
  update: (id: number, body: UpdateUserBody) =>
    api.patch<{ user: StaffUser }>(`/staff/${id}`, body),
  resendInvite: (id: number) => api.post<void>(`/staff/${id}/resend-invite`),
}
