// The entry of every worker thread of a pool made by `tsWorkerPool` (worker-pool.ts). Plain JavaScript because a
// worker thread starts without the TypeScript loader the server runs under (Node 20 ignores `--import` in a
// worker's execArgv); it loads the pool's TypeScript module through tsx's API and calls the task's function there.
import { workerData } from 'piscina';
import { tsImport } from 'tsx/esm/api';

const mod = tsImport(workerData.module, import.meta.url);

export default async function run({ fn, args }) {
  return (await mod)[fn](args);
}
