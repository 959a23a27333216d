import type { AuditEntry, CaughtMail, ListAuditQuery, MailItem } from '@shared/schemas/audit'
import { api } from './client'

export const auditApi = {
  list: (query: Partial<ListAuditQuery>) =>
    api.get<{ total: number; entries: AuditEntry[]; actions: string[] }>('/audit', query),
}

export const mailApi = {
  outbox: (status?: MailItem['status']) =>
    api.get<{ mails: MailItem[] }>('/mail/outbox', { status }),
  retry: (id: number) => api.post<void>(`/mail/outbox/${id}/retry`),
  mailbox: () => api.get<{ mails: CaughtMail[] }>('/mail/mailbox'),
}
