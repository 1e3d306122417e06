import type { Knex } from 'knex';
export { listOutbox, type CaughtMessage } from '../mail/catcher';
import { listOutbox } from '../mail/catcher';

/** The Outbox page: what the local catcher received, newest first. */
export async function outboxMessages(db: Knex, limit = 200) {
  return (await listOutbox(db, limit)).map((m) => ({ id: m.id, to: m.to, from: m.from, subject: m.subject, text: m.text, createdAt: m.createdAt }));
}
