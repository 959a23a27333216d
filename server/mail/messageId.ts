import { randomBytes } from 'node:crypto'

// Every mail gets its Message-ID when it is queued and keeps it through every try, so a mail
// sent again after a crash is the same message to whoever receives it. The form follows
// RFC 5322 §3.6.4: "<" id-left "@" id-right ">", both dot-atom-text; the right side is a domain
// the sender controls (the host of MAIL_FROM), the left side unique within it: the outbox row
// and random bytes, so two databases sending from one domain cannot make the same id.

/** What a dot-atom-text may hold (RFC 5322 §3.2.3): atext runs joined by single dots. */
const DOT_ATOM = /^[A-Za-z0-9!#$%&'*+/=?^_`{|}~-]+(\.[A-Za-z0-9!#$%&'*+/=?^_`{|}~-]+)*$/

/** Used when MAIL_FROM has no usable domain; `.invalid` is reserved for this (RFC 2606 §2). */
const FALLBACK_HOST = 'ringdown.invalid'

/** The domain of the sender address in `Name <local@domain>` or `local@domain`. */
export function messageIdHost(mailFrom: string): string {
  const address = /<([^>]*)>/.exec(mailFrom)?.[1] ?? mailFrom
  const at = address.lastIndexOf('@')
  const host =
    at < 0
      ? ''
      : address
          .slice(at + 1)
          .trim()
          .toLowerCase()
  return DOT_ATOM.test(host) ? host : FALLBACK_HOST
}

export function newMessageId(outboxId: number, host: string): string {
  return `<outbox-${outboxId}.${randomBytes(9).toString('hex')}@${host}>`
}
