import nodemailer, { type SendMailOptions } from 'nodemailer'
import type SMTPTransport from 'nodemailer/lib/smtp-transport'

export interface OutgoingMail {
  from: string
  to: string
  subject: string
  text: string
  html: string
  /** The mail's RFC 5322 Message-ID, the same on every try of one mail. */
  messageId?: string
}

/** How long one try may take (Config.mail gives these). */
export interface MailTimeouts {
  /** Connecting, and then the server's greeting, each get this long. */
  connectTimeoutMs: number
  /** The whole SMTP conversation for one mail gets this long. */
  sendTimeoutMs: number
}

export interface SendOptions {
  /** Aborting ends the SMTP conversation at once (the outbox's timeout, or stopping). */
  signal?: AbortSignal
  timeouts?: MailTimeouts
}

/** The one thing the outbox needs from a mail server. */
export interface Mailer {
  send(mail: OutgoingMail, options?: SendOptions): Promise<void>
}

/** The defaults of Config.mail, for a mailer used without the outbox's settings. */
const DEFAULT_TIMEOUTS: MailTimeouts = { connectTimeoutMs: 10_000, sendTimeoutMs: 30_000 }

/*
 * Short timeouts on purpose. RFC 5321 §4.5.3.2 gives relays minutes per step (from memory: five
 * for the greeting, MAIL and RCPT, ten for the end of DATA); an outbox that waited that long on
 * a server that accepts connections and never answers would hold every other mail behind it.
 * Connecting and the greeting get connectTimeoutMs (nodemailer 10 counts the greeting against
 * the connection's deadline too, so together they take no longer); a socket silent longer than
 * the whole budget is dead; and the outbox aborts the try at sendTimeoutMs whatever step it is in. A try
 * cut off after the final "." may still have been taken: it is sent again with the same
 * Message-ID, so keep sendTimeoutMs above what the mail server usually needs to accept a mail.
 */
function transportOptions(
  base: string | { host: string; port: number },
  t: MailTimeouts,
): SMTPTransport.Options {
  const timeouts = {
    connectionTimeout: t.connectTimeoutMs,
    greetingTimeout: t.connectTimeoutMs,
    socketTimeout: t.sendTimeoutMs,
  }
  return typeof base === 'string'
    ? { url: base, ...timeouts }
    : { host: base.host, port: base.port, secure: false, ignoreTLS: true, ...timeouts }
}

export function smtpMailer(options: string | { host: string; port: number }): Mailer {
  // One transport per set of timeouts (in practice one): a plain SMTP transport opens a new
  // connection for each mail, so nothing is held between tries.
  const transports = new Map<string, ReturnType<typeof nodemailer.createTransport>>()
  const transportFor = (t: MailTimeouts) => {
    const key = `${t.connectTimeoutMs}/${t.sendTimeoutMs}`
    let transport = transports.get(key)
    if (!transport) {
      transport = nodemailer.createTransport(transportOptions(options, t))
      transports.set(key, transport)
    }
    return transport
  }
  return {
    async send(mail, { signal, timeouts = DEFAULT_TIMEOUTS } = {}) {
      // nodemailer 10 ends the conversation and closes the socket when the signal aborts; the
      // typings predate the option.
      const message: SendMailOptions & { signal?: AbortSignal } = { ...mail, signal }
      await transportFor(timeouts).sendMail(message)
    },
  }
}
