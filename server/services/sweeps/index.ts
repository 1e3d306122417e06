import type { AppDeps } from '../../deps';
import type { SandboxLimits } from '../../../shared/schemas/limits';
import type { Sandbox } from '../../sandbox/types';
import { LocalSweepQueue } from './local-queue';
import { finishedMail } from './service';
import { unfinishedSweepIds, type SweepRow } from './store';
import { resolveScriptInputs } from '../runs';

export type { SweepQueue } from './queue';

/** The embedded queue with `resumeUnfinished`, which the server calls once on start. */
export interface EmbeddedSweepQueue extends LocalSweepQueue {
  resumeUnfinished(): Promise<number[]>;
}

/**
 * Builds the embedded sweep queue over the app's sandbox: datasets and recipes a sweep's source
 * names are resolved once per sweep, the limits are those recorded when it was created, and the
 * member is mailed at the end if they asked.
 */
export function createSweepQueue(deps: AppDeps & { sandbox?: Sandbox }): EmbeddedSweepQueue {
  const sandbox = deps.sandbox as Sandbox | undefined;
  if (!sandbox) throw new Error('createSweepQueue needs deps.sandbox');
  const queue = new LocalSweepQueue({
    db: deps.db,
    runPoint: (job, signal) => sandbox.run(job, signal),
    runBatch: sandbox.runBatch ? (base, paramsList, signal, onResult) => sandbox.runBatch!(base, paramsList, signal, onResult) : undefined,
    prepare: async (row: SweepRow) => {
      const { datasets, recipes } = await resolveScriptInputs(deps.db, row.group_id, row.source);
      return {
        source: row.source,
        language: row.language,
        seed: row.seed,
        limits: JSON.parse(row.limits) as SandboxLimits,
        datasets,
        recipes,
      };
    },
    onFinished: async (row) => {
      if (!row.notify) return;
      const user = await deps.db('users').where({ id: row.user_id }).first<{ email: string } | undefined>('email');
      if (!user) return;
      await deps.mailer.send({ to: user.email, ...finishedMail(row, deps.config.appOrigin) });
    },
  }) as EmbeddedSweepQueue;
  queue.resumeUnfinished = async () => {
    const ids = await unfinishedSweepIds(deps.db);
    for (const id of ids) queue.enqueue(id);
    return ids;
  };
  return queue;
}
