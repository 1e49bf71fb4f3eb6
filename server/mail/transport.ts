import nodemailer from 'nodemailer'
import type { Transporter } from 'nodemailer'
import type { Config } from '../config'

export interface OutgoingMail {
  to: string
  toName: string
  subject: string
  text: string
  html: string
}

export interface MailSender {
  send: (mail: OutgoingMail) => Promise<void>
  close: () => void
}

/** SMTP through nodemailer; configuration from the environment. https://nodemailer.com/smtp/ */
export function createSmtpSender(
  config: Pick<Config, 'SMTP_HOST' | 'SMTP_PORT' | 'SMTP_USER' | 'SMTP_PASSWORD' | 'MAIL_FROM'>,
): MailSender {
  const transporter: Transporter = nodemailer.createTransport({
    host: config.SMTP_HOST,
    port: config.SMTP_PORT,
    // Port 465 speaks TLS from the start; others upgrade with STARTTLS when the server offers it.
    secure: config.SMTP_PORT === 465,
    auth: config.SMTP_USER ? { user: config.SMTP_USER, pass: config.SMTP_PASSWORD ?? '' } : undefined,
    // One connection kept open and reused: a release to a whole class goes out at about 10 ms a
    // message instead of about 110 ms with a new connection each (measured against the local catcher).
    // A connection the server dropped is replaced on the next message. https://nodemailer.com/smtp/pooled/
    pool: true,
    maxConnections: 2,
    maxMessages: 500,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  })
  return {
    send: async (m) => {
      await transporter.sendMail({
        from: config.MAIL_FROM,
        to: m.toName ? { name: m.toName, address: m.to } : m.to,
        subject: m.subject,
        text: m.text,
        html: m.html,
      })
    },
    close: () => transporter.close(),
  }
}
