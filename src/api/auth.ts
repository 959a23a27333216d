import type { Me } from '@shared/types/api'
import type { ChangePasswordBody, LoginBody } from '@shared/schemas/auth'
import { api } from './client'

export interface Features {
  mailbox: boolean
}

export const authApi = {
  me: () => api.get<{ user: Me | null; features: Features }>('/auth/me'),
  login: (body: LoginBody) => api.post<{ user: Me }>('/auth/login', body, { quiet401: true }),
  logout: () => api.post<void>('/auth/logout'),
  forgot: (email: string) => api.post<{ message: string }>('/auth/forgot', { email }),
  // POST, so the link's token never appears in an address the server or a proxy logs.
  inspectLink: (token: string) =>
    api.post<{ email: string; name: string; purpose: 'reset' | 'invite' }>('/auth/link', {
      token,
    }),
  setPassword: (token: string, password: string) =>
    api.post<{ user: Me }>('/auth/set-password', { token, password }),
  changePassword: (body: ChangePasswordBody) => api.post<{ user: Me }>('/auth/password', body),
}
