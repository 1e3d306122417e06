import type { AddressInfo } from 'node:net';
import type { Knex } from 'knex';
import { simpleParser, type AddressObject } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { nowIso } from '../db/time';
import { log } from '../http/log';

export interface CaughtMessage {
  id: number;
  to: string;
  from: string;
  subject: string;
  text: string;
  createdAt: string;
}

export interface MailCatcher {
  port: number;
  close(): Promise<void>;
  /** Every stored message, newest first. */
  messages(): Promise<CaughtMessage[]>;
  /** Resolves with the first message (newest first) for which `match` holds, polling the outbox. */
  waitFor(match: (m: CaughtMessage) => boolean, timeoutMs?: number): Promise<CaughtMessage>;
}

function addressText(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return '';
  return (Array.isArray(a) ? a : [a]).map((x) => x.value.map((v) => v.address ?? '').filter(Boolean).join(', ')).join(', ');
}

export async function listOutbox(db: Knex, limit = 200): Promise<CaughtMessage[]> {
  const rows = (await db('mail_outbox').orderBy('id', 'desc').limit(limit).select('id', 'to_addr', 'from_addr', 'subject', 'text', 'created_at')) as {
    id: number; to_addr: string; from_addr: string; subject: string; text: string; created_at: string;
  }[];
  return rows.map((r) => ({ id: r.id, to: r.to_addr, from: r.from_addr, subject: r.subject, text: r.text, createdAt: r.created_at }));
}

/**
 * A real SMTP receiver on loopback. Each message is parsed and stored in mail_outbox before the
 * DATA command is answered, so a sender's `send()` resolving means the message is in the outbox.
 */
export async function startMailCatcher(db: Knex, opts: { port?: number; host?: string } = {}): Promise<MailCatcher> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    logger: false,
    banner: 'Comoving mail catcher',
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (mail) => {
          const envelopeTo = session.envelope.rcptTo.map((r) => r.address).join(', ');
          const envelopeFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
          await db('mail_outbox').insert({
            message_id: mail.messageId ?? null,
            from_addr: addressText(mail.from) || envelopeFrom,
            to_addr: addressText(mail.to) || envelopeTo,
            subject: mail.subject ?? '',
            text: (mail.text ?? '').replace(/\s+$/, ''),
            html: typeof mail.html === 'string' ? mail.html : null,
            created_at: nowIso(),
          });
          callback();
        })
        .catch((err: unknown) => {
          log('error', 'mail catcher could not store a message', { error: String(err) });
          callback(err instanceof Error ? err : new Error(String(err)));
        });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port ?? 0, opts.host ?? '127.0.0.1', () => {
      server.off('error', reject);
      resolve();
    });
  });
  server.on('error', (err) => log('warn', 'mail catcher error', { error: String(err) }));
  const port = (server.server.address() as AddressInfo).port;
  return {
    port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
    messages: () => listOutbox(db),
    async waitFor(match, timeoutMs = 5000) {
      const until = Date.now() + timeoutMs;
      for (;;) {
        const found = (await listOutbox(db)).find(match);
        if (found) return found;
        if (Date.now() > until) throw new Error('No matching message reached the mail catcher in time');
        await new Promise((r) => setTimeout(r, 25));
      }
    },
  };
}
