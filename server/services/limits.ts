/**
 * Sandbox limits: site-wide values in settings under 'sandbox.limits' (missing fields take the
 * defaults), per-group overrides in `group_limits`. Read at the start of every run, so a change applies
 * to the next run.
 */
import type { Knex } from 'knex';
import { audit } from './audit';
import {
  DEFAULT_LIMITS,
  LIMIT_FIELDS,
  LIMIT_NAMES,
  SandboxLimitsSchema,
  type GroupLimitOverrides,
  type LimitName,
  type SandboxLimits,
  type UpdateLimits,
} from '../../shared/schemas/limits';
import { nowIso } from '../db/time';

export const LIMITS_SETTING_KEY = 'sandbox.limits';

/** Stored values that are out of range (e.g. after a range change) fall back to the default. */
function sanitize(raw: unknown): SandboxLimits {
  const out: SandboxLimits = { ...DEFAULT_LIMITS };
  if (raw && typeof raw === 'object') {
    for (const n of LIMIT_NAMES) {
      const v = (raw as Record<string, unknown>)[n];
      const f = LIMIT_FIELDS[n];
      if (typeof v === 'number' && Number.isInteger(v) && v >= f.min && v <= f.max) out[n] = v;
    }
  }
  return out;
}

export async function getSiteLimits(db: Knex | Knex.Transaction): Promise<SandboxLimits> {
  const row = (await db('settings').where({ key: LIMITS_SETTING_KEY }).first('value')) as { value: string } | undefined;
  if (!row) return { ...DEFAULT_LIMITS };
  try {
    return sanitize(JSON.parse(row.value));
  } catch {
    return { ...DEFAULT_LIMITS };
  }
}

export async function getGroupOverrides(db: Knex | Knex.Transaction, groupId: number): Promise<Partial<SandboxLimits>> {
  const rows = (await db('group_limits').where({ group_id: groupId }).select('name', 'value')) as { name: string; value: number }[];
  const out: Partial<SandboxLimits> = {};
  for (const r of rows) {
    if ((LIMIT_NAMES as string[]).includes(r.name)) {
      const f = LIMIT_FIELDS[r.name as LimitName];
      if (r.value >= f.min && r.value <= f.max) out[r.name as LimitName] = r.value;
    }
  }
  return out;
}

/** The limits a run gets: site-wide, with the group's overrides applied when a group is given. */
export async function getLimits(db: Knex | Knex.Transaction, groupId?: number | null): Promise<SandboxLimits> {
  const site = await getSiteLimits(db);
  if (groupId == null) return site;
  return SandboxLimitsSchema.parse({ ...site, ...(await getGroupOverrides(db, groupId)) });
}

/** Change some site-wide fields (already range-checked by the route's schema); audited. */
export async function updateLimits(db: Knex, input: { userId: number; changes: UpdateLimits }): Promise<SandboxLimits> {
  return db.transaction(async (trx) => {
    const before = await getSiteLimits(trx);
    const after = SandboxLimitsSchema.parse({ ...before, ...input.changes });
    const value = JSON.stringify(after);
    const at = nowIso();
    await trx('settings')
      .insert({ key: LIMITS_SETTING_KEY, value, updated_at: at, updated_by: input.userId })
      .onConflict('key')
      .merge({ value, updated_at: at, updated_by: input.userId });
    const changed = LIMIT_NAMES.filter((n) => before[n] !== after[n]);
    await audit(trx, {
      userId: input.userId,
      action: 'sandbox.limits.update',
      target: 'settings:sandbox.limits',
      details: Object.fromEntries(changed.map((n) => [n, { from: before[n], to: after[n] }])),
    });
    return after;
  });
}

/** Set (number) or clear (null) a group's overrides; fields left out stay as they are; audited. */
export async function updateGroupOverrides(
  db: Knex,
  input: { userId: number; groupId: number; changes: GroupLimitOverrides },
): Promise<Partial<SandboxLimits>> {
  return db.transaction(async (trx) => {
    const before = await getGroupOverrides(trx, input.groupId);
    const at = nowIso();
    for (const n of LIMIT_NAMES) {
      const v = input.changes[n];
      if (v === undefined) continue;
      if (v === null) {
        await trx('group_limits').where({ group_id: input.groupId, name: n }).delete();
      } else {
        await trx('group_limits')
          .insert({ group_id: input.groupId, name: n, value: v, updated_at: at, updated_by: input.userId })
          .onConflict(['group_id', 'name'])
          .merge({ value: v, updated_at: at, updated_by: input.userId });
      }
    }
    const after = await getGroupOverrides(trx, input.groupId);
    await audit(trx, {
      userId: input.userId,
      action: 'sandbox.group_limits.update',
      target: `group:${input.groupId}`,
      details: { before, after },
    });
    return after;
  });
}
