import { createTransport, type Transporter } from 'nodemailer'
import { SMTPServer } from 'smtp-server'
import { simpleParser } from 'mailparser'
import type { AddressInfo } from 'node:net'

let transport: Transporter | undefined
let localServer: SMTPServer | undefined
let localPort: number | undefined

/**
 * Starts the embedded SMTP server on 127.0.0.1 (when `SMTP_URL` is absent). It accepts mail for any
 * address and stores each message in `mail_messages`, which admins read on the mail-drop page.
 * @returns the port it listens on (ephemeral unless ISTHMUS_LOCAL_SMTP_PORT is set).
 */
export async function startLocalSmtp(db: DB, port: number): Promise<number> {
  if (localPort !== undefined) return localPort
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    banner: 'Isthmus local mail drop',
    size: 10 * 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = []
      stream.on('data', (c: Buffer) => chunks.push(c))
      stream.on('error', callback)
      stream.on('end', async () => {
        try {
          const raw = Buffer.concat(chunks)
          const parsed = await simpleParser(raw)
          await db.insert(schema.mailMessages).values({
            envelopeFrom: session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
            envelopeTo: session.envelope.rcptTo.map(r => r.address),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : null,
            raw: raw.toString('utf8'),
          })
          callback()
        }
        catch (error) {
          callback(error as Error)
        }
      })
    },
  })
  server.on('error', error => console.error('[isthmus] local SMTP server error:', error))
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject)
    server.listen(port, '127.0.0.1', () => resolve())
  })
  localServer = server
  localPort = (server.server.address() as AddressInfo).port
  return localPort
}

export function stopLocalSmtp(): Promise<void> {
  const server = localServer
  localServer = undefined
  localPort = undefined
  return new Promise(resolve => (server ? server.close(() => resolve()) : resolve()))
}

/** The outgoing transport: `SMTP_URL` when set, else the embedded loopback server. */
export function useMailTransport(): Transporter {
  if (transport) return transport
  const config = useConfig()
  if (config.smtpUrl) {
    transport = createTransport(config.smtpUrl)
  }
  else {
    if (localPort === undefined) throw new Error('The embedded SMTP server has not started')
    transport = createTransport({ host: '127.0.0.1', port: localPort, secure: false, ignoreTLS: true })
  }
  return transport
}

export interface OutgoingMail {
  to: string
  subject: string
  text: string
}

/** Sends a plain-text mail. Failures are logged and reported to the caller, never swallowed. */
export async function sendMail(mail: OutgoingMail): Promise<void> {
  const config = useConfig()
  await useMailTransport().sendMail({ from: config.mailFrom, to: mail.to, subject: mail.subject, text: mail.text })
}

/** An absolute link for a mail, built from the configured public URL, never the Host header. */
export function publicLink(path: string): string {
  return `${useConfig().publicUrl}${path.startsWith('/') ? '' : '/'}${path}`
}
