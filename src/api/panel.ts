import type {
  CreatePlayerBody,
  ListPlayersQuery,
  PanelSummary,
  Player,
  UpdatePlayerBody,
} from '@shared/schemas/panel'
import { api } from './client'

export const panelApi = {
  summary: () => api.get<PanelSummary>('/panel/summary'),
  list: (query: Partial<ListPlayersQuery>) =>
    api.get<{ players: Player[] }>('/panel/players', query),
  get: (id: number) => api.get<{ player: Player }>(`/panel/players/${id}`),
  create: (body: CreatePlayerBody) => api.post<{ player: Player }>('/panel/players', body),
  update: (id: number, body: UpdatePlayerBody) =>
    api.patch<{ player: Player }>(`/panel/players/${id}`, body),
  erase: (id: number) => api.del<{ player: Player }>(`/panel/players/${id}`),
  importCsv: (file: File) => {
    const form = new FormData()
    form.append('file', file)
    return api.post<{ imported: number }>('/panel/import', form)
  },
}
