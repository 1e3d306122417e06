import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { NotebookExample } from '../../../shared/schemas/notebooks';
import { createNotebook } from '../../services/notebooks';
import { DEMO_GROUP_NAME } from './demoAccounts';
import type { SeedStep } from './index';

/** examples/notebooks at the top of the repo; resolved from this file so the working directory does not matter. */
export const EXAMPLE_NOTEBOOKS_DIR = fileURLToPath(new URL('../../../examples/notebooks/', import.meta.url));

/** The example notebooks, parsed and checked against the same schema the API uses, in file-name order. */
export function loadExampleNotebooks(dir = EXAMPLE_NOTEBOOKS_DIR): Array<NotebookExample & { file: string }> {
  return readdirSync(dir)
    .filter((f) => f.endsWith('.json'))
    .sort()
    .map((file) => {
      const parsed = NotebookExample.safeParse(JSON.parse(readFileSync(path.join(dir, file), 'utf8')));
      if (!parsed.success) {
        const issue = parsed.error.issues[0];
        throw new Error(`examples/notebooks/${file}: ${issue?.path.join('.')}: ${issue?.message}`);
      }
      return { ...parsed.data, file };
    });
}

const DEFAULT_OWNER = 'bo@lindqvist-lab.example';

export const exampleNotebooks: SeedStep = {
  name: 'example notebooks',
  async run(db, ctx) {
    const groupId = ctx.groups[DEMO_GROUP_NAME];
    if (groupId === undefined) throw new Error('example notebooks: the demo group must be seeded first');
    for (const ex of loadExampleNotebooks()) {
      const ownerEmail = ex.owner ?? DEFAULT_OWNER;
      const userId = ctx.users[ownerEmail];
      if (userId === undefined) throw new Error(`examples/notebooks/${ex.file}: owner ${ownerEmail} is not a demo account`);
      await createNotebook(db, {
        groupId,
        userId,
        title: ex.title,
        blocks: ex.blocks,
        message: ex.message ?? 'Example notebook',
        auditAction: 'seed.notebook',
        auditDetails: { file: ex.file },
      });
    }
  },
};
