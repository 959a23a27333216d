import type { FindingsQuery, FindingsTable, SessionFindings } from '@shared/schemas/findings'
import { api, request } from './client'

export const findingsApi = {
  get: (sessionId: number, query: FindingsQuery) =>
    api.get<SessionFindings>(`/findings/${sessionId}`, query),
  exclude: (sessionId: number, playerCode: string, reason: string) =>
    api.post<SessionFindings>(`/findings/${sessionId}/exclusions`, { playerCode, reason }),
  include: (sessionId: number, playerCode: string, reason: string) =>
    request<SessionFindings>(
      'DELETE',
      `/findings/${sessionId}/exclusions/${encodeURIComponent(playerCode)}`,
      { body: { reason } },
    ),
  /** Plain links: the browser downloads them with the session cookie. */
  answersCsv: (sessionId: number) => `/api/findings/${sessionId}/export/answers.csv`,
  tableCsv: (sessionId: number, table: FindingsTable) =>
    `/api/findings/${sessionId}/export/${table}.csv`,
}
