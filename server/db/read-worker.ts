/**
 * A worker thread of the read pool (`read-pool.ts`): its own read-only connection to the SQLite file, so a long read
 * never holds up the server's event loop. WAL mode lets it read while the server writes.
 */
import Database from 'better-sqlite3';
import { workerData } from 'piscina';
import { csvLine } from '../lib/csv.js';

const db = new Database((workerData as { file: string }).file, { readonly: true, fileMustExist: true });
db.pragma('busy_timeout = 5000');

const statements = new Map<string, Database.Statement>();
function prepared(sql: string): Database.Statement {
  let s = statements.get(sql);
  if (!s) {
    s = db.prepare(sql);
    if (statements.size > 200) statements.clear();
    statements.set(sql, s);
  }
  return s;
}

export interface ReadTask {
  sql: string;
  params: unknown[];
}

// better-sqlite3 binds no booleans; TypeORM's driver turns them into 0/1 the same way.
const bindable = (params: unknown[]) => params.map((p) => (typeof p === 'boolean' ? Number(p) : p));

export function rows({ sql, params }: ReadTask): unknown[] {
  return prepared(sql).all(...bindable(params));
}

/** The rows as CSV records of `columns`, and the last row (the keyset cursor of the next batch). */
export function csv({ sql, params, columns }: ReadTask & { columns: string[] }): { text: string; count: number; last: unknown } {
  const out = prepared(sql).all(...bindable(params)) as Record<string, unknown>[];
  let text = '';
  for (const row of out) text += csvLine(row, columns);
  return { text, count: out.length, last: out.at(-1) ?? null };
}
