import nodemailer, { type Transporter } from 'nodemailer'

let transporter: Transporter | undefined

/** The SMTP transport from runtime config: the local mail catcher in demo and tests, real SMTP in production. */
function useTransport(): Transporter {
  if (!transporter) {
    const c = useRuntimeConfig()
    transporter = nodemailer.createTransport({
      host: c.smtpHost,
      port: Number(c.smtpPort),
      secure: String(c.smtpSecure) === 'true',
      auth: c.smtpUser ? { user: c.smtpUser, pass: c.smtpPass } : undefined,
      connectionTimeout: 10_000,
      greetingTimeout: 10_000,
      socketTimeout: 20_000,
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

/** Sends one message; throws when the mail server cannot be reached or refuses it. */
export async function sendMail(mail: OutgoingMail): Promise<void> {
  await useTransport().sendMail({ from: useRuntimeConfig().mailFrom, ...mail })
}
