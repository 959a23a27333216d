import nodemailer from 'nodemailer'

export interface OutgoingMail {
  from: string
  to: string
  subject: string
  text: string
  html: string
}

/** The one thing the outbox needs from a mail server. */
export interface Mailer {
  send(mail: OutgoingMail): Promise<void>
}

export function smtpMailer(options: string | { host: string; port: number }): Mailer {
  const transport =
    typeof options === 'string'
      ? nodemailer.createTransport(options)
      : nodemailer.createTransport({
          host: options.host,
          port: options.port,
          secure: false,
          ignoreTLS: true,
        })
  return {
    async send(mail) {
      await transport.sendMail(mail)
    },
  }
}
