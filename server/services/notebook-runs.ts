import type { AppDeps } from '../deps';
import { getNotebook } from './notebooks';
import { executeRun } from './runs';

/**
 * Runs every script block of a notebook from the top, one after another, as `userId`, storing each
 * run against the notebook's current version. The server uses it once after seeding so that the
 * demo notebooks open with their results already beneath their blocks.
 */
export async function runNotebookBlocks(deps: AppDeps, notebookId: number, userId: number): Promise<{ ran: number; failed: number }> {
  const nb = await getNotebook(deps.db, notebookId);
  let ran = 0;
  let failed = 0;
  for (const block of nb.blocks) {
    if (block.kind !== 'script') continue;
    const run = await executeRun(deps, {
      userId,
      groupId: nb.groupId,
      source: block.source,
      language: 'ts',
      notebookId: nb.id,
      notebookVersion: nb.version,
      blockId: block.id,
    });
    ran++;
    if (run.status !== 'done') failed++;
  }
  return { ran, failed };
}
