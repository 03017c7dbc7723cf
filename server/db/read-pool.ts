import os from 'node:os';
import type { DataSource } from 'typeorm';
import { csvLine } from '../lib/csv.js';
import { tsWorkerPool } from '../lib/worker-pool.js';

/**
 * Reads that can take long (the access log's pages, counts and exports over a million rows). On a SQLite file they
 * run in worker threads with their own read-only connections, because better-sqlite3 is synchronous and a long query
 * on the server's connection stops every other request meanwhile. On an in-memory database (tests) or on a driver
 * that does not block (PostgreSQL's is asynchronous) they run on the data source itself.
 * Build the SQL with TypeORM's query builder (`getQueryAndParameters()`) so it stays in the data source's dialect.
 */
export interface ReadPool {
  rows<T>(sql: string, params: unknown[]): Promise<T[]>;
  /** Rows as CSV records of `columns`, formatted where they were read; `last` is the last row, for a keyset cursor. */
  csv<T>(sql: string, params: unknown[], columns: readonly string[]): Promise<{ text: string; count: number; last: T | null }>;
  /** True when reads run in worker threads. */
  readonly threaded: boolean;
  /** Reads started so far (an export's batches show here as they are read). */
  readonly started: number;
  close(): Promise<void>;
}

function sqliteFile(db: DataSource): string | null {
  if (db.options.type !== 'better-sqlite3') return null;
  const file = db.options.database;
  return typeof file === 'string' && file !== ':memory:' && file !== '' ? file : null;
}

function threadedPool(file: string): ReadPool {
  // One thread leaves the other cores to the HTTP thread and the image workers; more admins' exports queue.
  const pool = tsWorkerPool<typeof import('./read-worker.js')>(new URL('./read-worker.ts', import.meta.url), {
    workerData: { file },
    maxThreads: Math.max(1, Math.min(2, os.availableParallelism() - 1)),
  });
  const p = {
    threaded: true,
    started: 0,
    rows: <T>(sql: string, params: unknown[]) => {
      p.started++;
      return pool.run('rows', { sql, params }) as Promise<T[]>;
    },
    csv: <T>(sql: string, params: unknown[], columns: readonly string[]) => {
      p.started++;
      return pool.run('csv', { sql, params, columns: [...columns] }) as Promise<{ text: string; count: number; last: T | null }>;
    },
    close: () => pool.close(),
  };
  return p;
}

function inProcessPool(db: DataSource): ReadPool {
  const rows = async <T>(sql: string, params: unknown[]) => {
    p.started++;
    return (await db.query(sql, params)) as T[];
  };
  const p = {
    threaded: false,
    started: 0,
    rows,
    async csv<T>(sql: string, params: unknown[], columns: readonly string[]) {
      const out = await rows<Record<string, unknown>>(sql, params);
      return { text: out.map((r) => csvLine(r, columns)).join(''), count: out.length, last: (out.at(-1) ?? null) as T | null };
    },
    close: async () => undefined,
  };
  return p;
}

const pools = new WeakMap<DataSource, ReadPool>();

/** The read pool of a data source, made on first use. */
export function readPoolFor(db: DataSource): ReadPool {
  let p = pools.get(db);
  if (!p) {
    const file = sqliteFile(db);
    p = file ? threadedPool(file) : inProcessPool(db);
    pools.set(db, p);
  }
  return p;
}

/** Stops the pool's threads (on shutdown, before the database closes). */
export async function closeReadPool(db: DataSource): Promise<void> {
  const p = pools.get(db);
  pools.delete(db);
  await p?.close();
}
