import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { Piscina } from 'piscina';

const ENTRY = path.join(path.dirname(fileURLToPath(import.meta.url)), 'worker-entry.mjs');

/** A piscina pool whose threads run the exported functions of one TypeScript module. */
export interface TsWorkerPool<M> {
  run<K extends keyof M & string>(fn: K, args: M[K] extends (a: infer A) => unknown ? A : never): Promise<M[K] extends (...a: never[]) => infer R ? Awaited<R> : never>;
  readonly pool: Piscina;
  close(): Promise<void>;
}

/**
 * Worker threads for `module` (an absolute path to a .ts file, e.g. `new URL('./x.ts', import.meta.url)`), started on
 * demand and stopped when idle. `workerData` reaches the module through piscina's `workerData`.
 */
export function tsWorkerPool<M>(module: URL, opts: { maxThreads: number; idleTimeout?: number; maxQueue?: number; workerData?: Record<string, unknown>; resourceLimits?: { maxOldGenerationSizeMb?: number } }): TsWorkerPool<M> {
  const pool = new Piscina({
    filename: ENTRY,
    workerData: { ...opts.workerData, module: fileURLToPath(module) },
    minThreads: 0,
    maxThreads: opts.maxThreads,
    idleTimeout: opts.idleTimeout ?? 60_000,
    ...(opts.maxQueue !== undefined ? { maxQueue: opts.maxQueue } : {}),
    ...(opts.resourceLimits ? { resourceLimits: opts.resourceLimits } : {}),
  });
  return {
    pool,
    run: (fn, args) => pool.run({ fn, args }),
    close: () => pool.destroy(),
  };
}
