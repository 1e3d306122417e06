import type { Knex } from 'knex';
import { demoAccounts } from './demoAccounts';
import { exampleNotebooks } from './notebooks';
import { demoRecipes } from './recipes';
import { demoDatasets } from './datasets';

/** What earlier steps made, for later steps to build on (filled by demoAccounts). */
export interface SeedContext {
  /** User ids by demo e-mail. */
  users: Record<string, number>;
  /** Group ids by name. */
  groups: Record<string, number>;
}

export interface SeedStep {
  name: string;
  /** Use the `db` given (it is the seed's transaction), never another handle. */
  run(db: Knex.Transaction, ctx: SeedContext): Promise<void>;
}

/** The seed steps, in order. Other areas append their step here with a one-line edit. */
export const seedSteps: SeedStep[] = [
  demoAccounts,
  demoDatasets,
  demoRecipes,
  exampleNotebooks,
];

/** True when no user exists yet: the only state in which the seed runs. */
export async function isEmptyDatabase(db: Knex): Promise<boolean> {
  const row = (await db('users').count({ n: '*' }).first()) as { n: number } | undefined;
  return Number(row?.n ?? 0) === 0;
}

/**
 * Puts in the demo data when, and only when, the database has no users; all steps run in one
 * transaction so that a failing step leaves the database empty rather than half-seeded.
 * Returns whether it seeded.
 */
export async function seedIfEmpty(db: Knex, steps: SeedStep[] = seedSteps): Promise<boolean> {
  if (!(await isEmptyDatabase(db))) return false;
  await db.transaction(async (trx) => {
    const ctx: SeedContext = { users: {}, groups: {} };
    for (const step of steps) await step.run(trx, ctx);
  });
  return true;
}
