import nodemailer, { type Transporter } from 'nodemailer'
import { smtpTlsDecision, type TransportTimeouts } from '../services/notices'

let transporter: Transporter | undefined

/** The transport's timeouts from runtime config (milliseconds); the notice lease is sized from them. */
export function transportTimeouts(): TransportTimeouts {
  const c = useRuntimeConfig()
  return {
    connectionMs: Number(c.smtpConnectionTimeoutMs),
    greetingMs: Number(c.smtpGreetingTimeoutMs),
    socketMs: Number(c.smtpSocketTimeoutMs),
  }
}

/** Thrown instead of sending when the SMTP settings do not allow a safe connection; never retried sooner than an outage. */
export class MailConfigError extends Error {
  code = 'ECONNECTION'
}

/**
 * The SMTP transport from runtime config: the local mail catcher in demo and tests, real SMTP in
 * production — where TLS is required (see smtpTlsDecision): a server that offers none gets nothing.
 */
function useTransport(): Transporter {
  if (!transporter) {
    const c = useRuntimeConfig()
    const tls = smtpTlsDecision(String(c.smtpHost), String(c.smtpSecure) === 'true')
    if (!tls.send) {
      console.error(`[mail] not sending: ${tls.reason}`)
      throw new MailConfigError(tls.reason)
    }
    const t = transportTimeouts()
    transporter = nodemailer.createTransport({
      host: c.smtpHost,
      port: Number(c.smtpPort),
      secure: tls.secure,
      requireTLS: tls.requireTLS,
      tls: { minVersion: 'TLSv1.2' },
      auth: c.smtpUser ? { user: c.smtpUser, pass: c.smtpPass } : undefined,
      connectionTimeout: t.connectionMs,
      greetingTimeout: t.greetingMs,
      socketTimeout: t.socketMs,
    })
  }
  return transporter
}

export interface OutgoingMail {
  to: string
  subject: string
  text: string
  html: string
  /** Extra headers, e.g. List-Unsubscribe for optional notices. */
  headers?: Record<string, string>
}

/** Sends one message; throws when the mail server cannot be reached, offers no TLS where it must, or refuses it. */
export async function sendMail(mail: OutgoingMail): Promise<void> {
  try {
    await useTransport().sendMail({ from: useRuntimeConfig().mailFrom, ...mail })
  }
  catch (error) {
    const code = (error as { code?: unknown }).code
    if (code === 'ETLS' || code === 'EREQUIRETLS') {
      const c = useRuntimeConfig()
      console.error(`[mail] not sending: the SMTP server ${c.smtpHost}:${c.smtpPort} could not be reached over TLS, which any host but this machine requires (${(error as Error).message})`)
    }
    throw error
  }
}
