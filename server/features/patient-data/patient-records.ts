import type { DataSource, EntityManager } from 'typeorm';

/** Tables never exported or erased with a patient: staff, sessions, clinic set-up, and the access log (kept by law). */
const NOT_PATIENT_DATA = new Set(['user', 'session', 'login_failure', 'clinic_settings', 'shot_list', 'shot_list_view', 'consent_template', 'product', 'patient_erasure', 'chain_head', 'chain_tombstone', 'chain_digest', 'signing_identity', 'rate_limit']);

export interface TableRows {
  table: string;
  rows: Record<string, unknown>[];
}

interface Link {
  child: string;
  column: string;
  parentTable: string;
}

/**
 * How tables hang off each other: the foreign keys the database itself declares (read through TypeORM's
 * driver-neutral schema reader, so migrations that add a constraint without an entity relation still count),
 * plus `xxxId` columns naming another entity for ids stored without a constraint.
 */
async function links(db: DataSource, manager: EntityManager): Promise<Link[]> {
  const byName = new Map(db.entityMetadatas.map((m) => [m.targetName.toLowerCase(), m.tableName]));
  const runner = manager.queryRunner ?? db.createQueryRunner();
  const tables = await runner.getTables(db.entityMetadatas.map((m) => m.tableName)).finally(() => (manager.queryRunner ? undefined : runner.release()));
  const out: Link[] = [];
  for (const t of tables) {
    const seen = new Set<string>();
    for (const fk of t.foreignKeys) {
      if (fk.columnNames.length !== 1) continue;
      out.push({ child: t.name, column: fk.columnNames[0], parentTable: fk.referencedTableName });
      seen.add(fk.columnNames[0]);
    }
    for (const c of t.columns) {
      const match = /^(.+)Id$/.exec(c.name);
      const parent = match && byName.get(match[1].toLowerCase());
      if (parent && !seen.has(c.name)) out.push({ child: t.name, column: c.name, parentTable: parent });
    }
  }
  return out;
}

/**
 * Every row the clinic holds about one patient, table by table, parents before children:
 * the patient, then rows that point at a collected row, until nothing new is found.
 */
export async function collectPatientRecords(db: DataSource, manager: EntityManager, patientId: string, opts: { includeAccessLog: boolean }): Promise<TableRows[]> {
  const graph = await links(db, manager);
  const ids = new Map<string, Set<string>>([['patient', new Set([patientId])]]);
  const order: string[] = ['patient'];
  const rows = new Map<string, Map<string, Record<string, unknown>>>();
  rows.set('patient', new Map((await manager.query(`SELECT * FROM "patient" WHERE "id" = ?`, [patientId])).map((r: Record<string, unknown>) => [String(r.id), r])));

  for (let changed = true; changed; ) {
    changed = false;
    for (const l of graph) {
      const table = l.child;
      if (NOT_PATIENT_DATA.has(table) || table === 'patient' || (table === 'audit_event' && !opts.includeAccessLog)) continue;
      const parentIds = ids.get(l.parentTable);
      if (!parentIds?.size) continue;
      const list = [...parentIds];
      const found: Record<string, unknown>[] = [];
      for (let i = 0; i < list.length; i += 500) {
        const chunk = list.slice(i, i + 500);
        found.push(...(await manager.query(`SELECT * FROM "${table}" WHERE "${l.column}" IN (${chunk.map(() => '?').join(',')})`, chunk)));
      }
      const primary = primaryKey(db, table);
      const have = rows.get(table) ?? new Map();
      for (const r of found) {
        const key = String(r[primary]);
        if (have.has(key)) continue;
        have.set(key, r);
        changed = true;
      }
      if (have.size) {
        rows.set(table, have);
        ids.set(table, new Set(have.keys()));
        if (!order.includes(table)) order.push(table);
      }
    }
  }
  return order.map((table) => ({ table, rows: [...(rows.get(table)?.values() ?? [])] }));
}

/** The primary key column of a table (every patient table has a single-column key). */
export const primaryKey = (db: DataSource, table: string): string =>
  db.entityMetadatas.find((m) => m.tableName === table)?.primaryColumns[0]?.databaseName ?? 'id';
