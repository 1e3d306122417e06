import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { uploadDataset } from '../../services/datasets';
import { DEMO_GROUP_NAME } from './demoAccounts';
import { DEMO_DATASETS } from './demo-datasets-manifest';
import type { SeedStep } from './index';

export const EXAMPLE_DATASETS_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../examples/datasets');

/** Seeds the invented demo datasets (examples/datasets/*.csv) into the demo group, through the same checks as an upload. */
export const demoDatasets: SeedStep = {
  name: 'demo datasets',
  async run(db, ctx) {
    const groupId = ctx.groups[DEMO_GROUP_NAME];
    const userId = ctx.users['bo@lindqvist-lab.example'] ?? null;
    for (const d of DEMO_DATASETS) {
      const csvText = readFileSync(path.join(EXAMPLE_DATASETS_DIR, d.file), 'utf8');
      await uploadDataset(db, { groupId, userId, name: d.name, kind: d.kind, description: d.description, csvText });
    }
  },
};
