import type { Request } from 'express';
import type { Deps } from '../../deps.js';
import { audit } from '../../lib/audit.js';
import { newId, nowIso } from '../../lib/time.js';
import { patientPrefix } from '../../storage/keys.js';
import { keepTombstone } from '../integrity/chain.js';
import { collectPatientRecords, primaryKey } from './patient-records.js';

type ErasureDeps = Pick<Deps, 'db' | 'storage' | 'logger'>;

interface JournalRow {
  id: string;
  patientId: string;
  erasedById: string;
  reason: string | null;
}

/**
 * Erases one patient in journal steps, so a crash at any point leaves a state that `resumeErasures` completes:
 * 1. the journal row is committed (it opens the consent delete triggers for this patient only);
 * 2. every object under the patient's prefix is deleted;
 * 3. in one transaction every row is deleted, the journal row finished and the erasure logged.
 * Objects may already be gone after step 2, so the only consistent end after a crash is completion.
 */
export async function erasePatient(deps: ErasureDeps, input: { patientId: string; erasedById: string; reason: string; req: Request | null }): Promise<{ rows: number; files: number }> {
  const row: JournalRow = { id: newId(), patientId: input.patientId, erasedById: input.erasedById, reason: input.reason };
  await deps.db.query(`INSERT INTO "patient_erasure" ("id", "patientId", "erasedById", "startedAt", "reason") VALUES (?, ?, ?, ?, ?)`, [row.id, row.patientId, row.erasedById, nowIso(), row.reason]);
  return completeErasure(deps, row, input.req);
}

async function completeErasure({ db, storage }: ErasureDeps, row: JournalRow, req: Request | null): Promise<{ rows: number; files: number }> {
  const keys = (await storage.list(patientPrefix(row.patientId))).sort();
  await storage.remove(keys);
  const rows = await db.transaction(async (tx) => {
    await tx.query('PRAGMA defer_foreign_keys = ON');
    const tables = await collectPatientRecords(db, tx, row.patientId, { includeAccessLog: false });
    let n = 0;
    for (const t of [...tables].reverse()) {
      const primary = primaryKey(db, t.table);
      for (const r of t.rows) {
        // A chained row leaves its hashes behind, so the chain still verifies without the patient's data.
        await keepTombstone(tx, t.table, r, row.id);
        await tx.query(`DELETE FROM "${t.table}" WHERE "${primary}" = ?`, [r[primary]]);
        n += 1;
      }
    }
    await tx.query(`UPDATE "patient_erasure" SET "finishedAt" = ?, "objectCount" = "objectCount" + ?, "rowCount" = ? WHERE "id" = ?`, [nowIso(), keys.length, n, row.id]);
    await audit(tx, req, {
      action: 'patient.erase',
      patientId: row.patientId,
      targetType: 'patient',
      targetId: row.patientId,
      details: { rows: n, files: keys.length, reason: row.reason, ...(req ? {} : { resumed: true }) },
      ...(req ? {} : { actorId: row.erasedById, actorRole: 'system' }),
    });
    return n;
  });
  return { rows, files: keys.length };
}

/** Completes every erasure a crash or an outage left unfinished (run at start, and by the sweep). */
export async function resumeErasures(deps: ErasureDeps): Promise<number> {
  const open: JournalRow[] = await deps.db.query(`SELECT "id", "patientId", "erasedById", "reason" FROM "patient_erasure" WHERE "finishedAt" IS NULL ORDER BY "startedAt"`);
  for (const row of open) {
    await completeErasure(deps, row, null);
    deps.logger.warn({ erasureId: row.id }, 'an unfinished patient erasure was completed');
  }
  return open.length;
}
