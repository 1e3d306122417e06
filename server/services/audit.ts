import type { Knex } from 'knex';
import { nowIso } from '../db/time';

export interface AuditEvent {
  /** The acting user; null for the system or an anonymous caller. */
  userId: number | null | undefined;
  /** Dotted verb, e.g. 'auth.sign_in', 'group.member.role', 'notebook.version.create'. */
  action: string;
  /** What was acted on, as 'kind:id', e.g. 'group:3', 'user:7'. */
  target?: string | null;
  details?: Record<string, unknown> | null;
}

/** Appends one entry to the audit trail; pass the transaction when inside one. */
export async function audit(db: Knex | Knex.Transaction, ev: AuditEvent): Promise<void> {
  await db('audit_log').insert({
    at: nowIso(),
    user_id: ev.userId ?? null,
    action: ev.action,
    target: ev.target ?? null,
    details: ev.details == null ? null : JSON.stringify(ev.details),
  });
}

export interface AuditRow {
  id: number;
  at: string;
  userId: number | null;
  userEmail: string | null;
  action: string;
  target: string | null;
  details: unknown;
}

export async function listAudit(
  db: Knex,
  q: { page: number; pageSize: number; action?: string; userId?: number },
): Promise<{ entries: AuditRow[]; page: number; pageSize: number; total: number }> {
  const base = db('audit_log as a').modify((qb) => {
    if (q.action) qb.where('a.action', 'like', `${q.action.replace(/[%_]/g, '')}%`);
    if (q.userId) qb.where('a.user_id', q.userId);
  });
  const totalRow = (await base.clone().count({ n: '*' }).first()) as { n: number } | undefined;
  const rows = (await base
    .clone()
    .leftJoin('users as u', 'u.id', 'a.user_id')
    .select('a.id', 'a.at', 'a.user_id', 'u.email', 'a.action', 'a.target', 'a.details')
    .orderBy('a.id', 'desc')
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)) as { id: number; at: string; user_id: number | null; email: string | null; action: string; target: string | null; details: string | null }[];
  return {
    entries: rows.map((r) => ({
      id: r.id,
      at: r.at,
      userId: r.user_id,
      userEmail: r.email,
      action: r.action,
      target: r.target,
      details: r.details ? (JSON.parse(r.details) as unknown) : null,
    })),
    page: q.page,
    pageSize: q.pageSize,
    total: Number(totalRow?.n ?? 0),
  };
}
