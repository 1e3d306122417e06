import { hashPassword } from '../../auth/password';
import { audit } from '../../services/audit';
import { nowIso } from '../time';
import type { SeedStep } from './index';

/** Demo only: the accounts README lists. */
export const DEMO_PASSWORD = 'comoving-demo';
export const DEMO_GROUP_NAME = 'Lindqvist Lab — Survey Cosmology';
export const SECOND_GROUP_NAME = 'Kessler Group — Early Universe';

export const DEMO_USERS = [
  { key: 'admin', email: 'ada@lindqvist-lab.example', name: 'Ada Lindqvist', role: 'admin' },
  { key: 'owner', email: 'bo@lindqvist-lab.example', name: 'Bo Kessler', role: 'member' },
  { key: 'editor', email: 'cyd@lindqvist-lab.example', name: 'Cyd Okafor', role: 'member' },
  { key: 'viewer', email: 'dee@lindqvist-lab.example', name: 'Dee Marsh', role: 'member' },
] as const;

const MEMBERSHIPS: { group: string; email: string; role: 'owner' | 'editor' | 'viewer' }[] = [
  { group: DEMO_GROUP_NAME, email: 'ada@lindqvist-lab.example', role: 'owner' },
  { group: DEMO_GROUP_NAME, email: 'bo@lindqvist-lab.example', role: 'owner' },
  { group: DEMO_GROUP_NAME, email: 'cyd@lindqvist-lab.example', role: 'editor' },
  { group: DEMO_GROUP_NAME, email: 'dee@lindqvist-lab.example', role: 'viewer' },
  { group: SECOND_GROUP_NAME, email: 'bo@lindqvist-lab.example', role: 'owner' },
  { group: SECOND_GROUP_NAME, email: 'cyd@lindqvist-lab.example', role: 'editor' },
];

// One hash per process: tests seed many fresh databases and argon2id costs ~130 ms a hash.
let demoHash: Promise<string> | undefined;

export const demoAccounts: SeedStep = {
  name: 'demo accounts and groups',
  async run(db, ctx) {
    demoHash ??= hashPassword(DEMO_PASSWORD);
    const password_hash = await demoHash;
    const now = nowIso();
    for (const u of DEMO_USERS) {
      const [row] = (await db('users').insert({ email: u.email, name: u.name, role: u.role, password_hash, created_at: now }).returning('id')) as { id: number }[];
      ctx.users[u.email] = row!.id;
    }
    for (const name of [DEMO_GROUP_NAME, SECOND_GROUP_NAME]) {
      const [row] = (await db('groups').insert({ name, created_at: now }).returning('id')) as { id: number }[];
      ctx.groups[name] = row!.id;
    }
    for (const m of MEMBERSHIPS) {
      await db('memberships').insert({ user_id: ctx.users[m.email], group_id: ctx.groups[m.group], role: m.role, created_at: now });
    }
    await audit(db, { userId: null, action: 'seed.demo_accounts', target: null, details: { users: DEMO_USERS.length, groups: 2 } });
  },
};
