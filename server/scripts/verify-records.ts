/**
 * `npm run verify:records`: walks the tamper-evident chains of the database the server would use (TWINFRAME_DATA_DIR)
 * and names the first broken row of each. Exit code 0 when every chain verifies, 1 when one is broken, 2 when the
 * database cannot be read. Reads only: it runs no migrations and writes nothing (not even an access-log line).
 */
import 'reflect-metadata';
import fs from 'node:fs';
import path from 'node:path';
import { loadConfig } from '../config.js';
import { createDataSource } from '../db/data-source.js';
import { walkChains } from '../features/integrity/walk.js';

const config = loadConfig();
const file = path.join(config.dataDir, 'twinframe.sqlite');
if (!fs.existsSync(file)) {
  console.error(`No database at ${file} (set TWINFRAME_DATA_DIR).`);
  process.exit(2);
}
const db = createDataSource(file);
try {
  await db.initialize();
  const reports = await walkChains(db);
  console.log(`Record chains of ${file}`);
  for (const r of reports) {
    const head = r.head ? `head #${r.head.seq} ${r.head.hash}` : 'no head';
    const extra = [r.tombstones ? `${r.tombstones} erased (tombstones)` : '', r.digestsChecked ? `${r.digestsChecked} e-mailed heads matched` : ''].filter(Boolean).join(', ');
    console.log(`  ${r.ok ? 'OK    ' : 'BROKEN'} ${r.label}: ${r.rows} rows${extra ? `, ${extra}` : ''}; ${head}`);
    if (r.problem) console.log(`         first broken row: ${r.problem.message}`);
  }
  process.exitCode = reports.every((r) => r.ok) ? 0 : 1;
} catch (err) {
  console.error(`Cannot check the record chains: ${err instanceof Error ? err.message : String(err)}`);
  process.exitCode = 2;
} finally {
  if (db.isInitialized) await db.destroy();
}
