/**
 * Tamper-evident chains over the consent records, their evidence (withdrawals included) and the access log.
 *
 * Each new row stores `rowHash`, the hash of its content, and `prevHash`, the chain hash of the row before it,
 * in the style of RFC 6962 (Certificate Transparency) with its domain-separation prefixes:
 *   rowHash   = SHA-256(0x00 ‖ canonical JSON of { chain, seq, row })
 *   chainHash = SHA-256(0x01 ‖ prevHash ‖ rowHash)         (the first row's prevHash is 64 zeros)
 * The chain head (seq and chainHash of the last row) is kept in `chain_head`, shown to admins and e-mailed to
 * them daily, so a rewrite made later, even of a row and its stored hash together, no longer matches what was
 * already sent out (FACTS 26). Written by hand: no package keeps such a chain inside TypeORM rows.
 *
 * Appends happen in `ChainSubscriber.beforeInsert`, inside the inserting transaction, so nobody can forget them:
 * the head row is bumped first (UPDATE … RETURNING), which locks it until commit on PostgreSQL and takes SQLite's
 * write lock, so concurrent writers queue instead of forking the chain. A transaction that appends to several
 * chains takes them in the order consent → evidence → access (signing, withdrawal and erasure all do), which keeps
 * PostgreSQL free of lock-order deadlocks.
 */
import { createHash } from 'node:crypto';
import { EntityManager, EventSubscriber, type DataSource, type EntitySubscriberInterface, type InsertEvent, type QueryRunner } from 'typeorm';
import { AuditEvent } from '../../entities/audit-event.js';
import { ConsentEvidence } from '../../entities/consent-evidence.js';
import { ConsentRecord } from '../../entities/consent-record.js';
import { ChainTombstone } from '../../entities/record-chain.js';
import { nowIso } from '../../lib/time.js';
import { canonicalJson } from '../consents/hash.js';
import type { ChainName } from './integrity.schemas.js';

export type { ChainName };

type ColumnKind = 'text' | 'int' | 'bool';

export interface ChainDefinition {
  name: ChainName;
  label: string;
  table: string;
  entity: typeof ConsentRecord | typeof ConsentEvidence | typeof AuditEvent;
  /** Time column that orders the rows written before the chain existed (the migration's backfill). */
  orderBy: string;
  /**
   * The hashed columns, frozen: null values are left out of the content, so a new nullable column may join this
   * list (it is null in every older row), but no other change may be made without breaking every older hash.
   */
  columns: Record<string, ColumnKind>;
  /** Columns deliberately outside the hash (tests check every column is in one list or the other). */
  unhashed: string[];
}


export const GENESIS = '0'.repeat(64);
const CHAIN_COLUMNS = ['chainSeq', 'prevHash', 'rowHash'];

export const CHAINS: Record<ChainName, ChainDefinition> = {
  consent: {
    name: 'consent',
    label: 'Consent records',
    table: 'consent_record',
    entity: ConsentRecord,
    orderBy: 'signedAt',
    columns: {
      id: 'text', patientId: 'text', templateId: 'text', kind: 'text', templateVersion: 'int', templateSha256: 'text', handoverId: 'text',
      visitId: 'text', answers: 'text', channels: 'text', crop: 'text', flaggedQuestionIds: 'text', signerName: 'text', nameMatchesPatient: 'bool',
      signatureKey: 'text', signatureSha256: 'text', pdfKey: 'text', pdfSha256: 'text', contentSha256: 'text', timeZone: 'text', shownAt: 'text',
      signedAt: 'text', startedById: 'text', signedIp: 'text', signedUserAgent: 'text',
    },
    // The withdrawal is set later, once (a trigger allows only that); it is chained as its own evidence row and the
    // walk checks the two agree.
    unhashed: ['withdrawnAt', 'withdrawnById', 'withdrawalReason', 'withdrawalDate', ...CHAIN_COLUMNS],
  },
  evidence: {
    name: 'evidence',
    label: 'Consent evidence and withdrawals',
    table: 'consent_evidence',
    entity: ConsentEvidence,
    orderBy: 'at',
    columns: { id: 'text', consentId: 'text', at: 'text', event: 'text', actorId: 'text', actorRole: 'text', ip: 'text', userAgent: 'text', details: 'text' },
    unhashed: CHAIN_COLUMNS,
  },
  access: {
    name: 'access',
    label: 'Access log',
    table: 'audit_event',
    entity: AuditEvent,
    orderBy: 'at',
    columns: {
      id: 'text', at: 'text', actorId: 'text', actorRole: 'text', action: 'text', patientId: 'text', targetType: 'text', targetId: 'text', ip: 'text',
      userAgent: 'text', details: 'text',
    },
    unhashed: CHAIN_COLUMNS,
  },
};

/** Lock order of the chain heads within one transaction (see the module comment). */
export const CHAIN_ORDER: ChainName[] = ['consent', 'evidence', 'access'];

const byTable = new Map(Object.values(CHAINS).map((c) => [c.table, c]));
export const chainOfTable = (table: string): ChainDefinition | undefined => byTable.get(table);

const sha256 = (...parts: Buffer[]) => createHash('sha256').update(Buffer.concat(parts)).digest('hex');

/** A column value as hashed, the same whether it comes from SQLite (0/1, numbers) or PostgreSQL (booleans). */
function normalise(kind: ColumnKind, v: unknown): string | number | boolean {
  if (kind === 'bool') return v === true || v === 1 || v === '1' || v === 't';
  if (kind === 'int') return Number(v);
  return String(v);
}

/** The hashed content of a row: its listed columns, nulls left out. */
export function rowContent(chain: ChainDefinition, row: Record<string, unknown>): Record<string, string | number | boolean> {
  const out: Record<string, string | number | boolean> = {};
  for (const [col, kind] of Object.entries(chain.columns)) {
    const v = row[col];
    if (v !== null && v !== undefined) out[col] = normalise(kind, v);
  }
  return out;
}

/** RFC 6962-style leaf hash of one row's content at its place in its chain. */
export function rowHashOf(chain: ChainDefinition, seq: number, row: Record<string, unknown>): string {
  return sha256(Buffer.from([0x00]), Buffer.from(canonicalJson({ chain: chain.name, seq, row: rowContent(chain, row) }), 'utf8'));
}

/** The chain hash after a row: what the next row stores as its prevHash, and the head after the last. */
export function linkHash(prevHash: string, rowHash: string): string {
  return sha256(Buffer.from([0x01]), Buffer.from(prevHash, 'hex'), Buffer.from(rowHash, 'hex'));
}

/** A query with parameters in the driver's own placeholder style (`?` on SQLite, `$1` on PostgreSQL). */
async function query<T>(qr: QueryRunner, sql: (p: (i: number) => string) => string, params: unknown[]): Promise<T[]> {
  const res = await qr.query(sql((i) => qr.connection.driver.createParameter(`p${i}`, i)), params, true);
  return res.records as T[];
}

/** Appends one row to its chain: bumps (and locks) the head, fills the row's chain columns, moves the head on. */
async function append(qr: QueryRunner, chain: ChainDefinition, row: Record<string, unknown>): Promise<void> {
  const [head] = await query<{ seq: number; hash: string }>(qr, (p) => `UPDATE "chain_head" SET "seq" = "seq" + 1 WHERE "chain" = ${p(0)} RETURNING "seq", "hash"`, [chain.name]);
  if (!head) throw new Error(`The ${chain.name} chain has no head row; run the migrations.`);
  const seq = Number(head.seq);
  const rowHash = rowHashOf(chain, seq, row);
  Object.assign(row, { chainSeq: seq, prevHash: head.hash, rowHash });
  await query(qr, (p) => `UPDATE "chain_head" SET "hash" = ${p(0)}, "updatedAt" = ${p(1)} WHERE "chain" = ${p(2)}`, [linkHash(head.hash, rowHash), nowIso(), chain.name]);
}

/** Appends on one connection one after another, even when TypeORM announces several inserted rows at once. */
const queues = new WeakMap<QueryRunner, Promise<unknown>>();
function serialised(qr: QueryRunner, fn: () => Promise<void>): Promise<void> {
  const run = (queues.get(qr) ?? Promise.resolve()).then(fn);
  queues.set(qr, run.catch(() => undefined));
  return run;
}

/**
 * Chains every row inserted through TypeORM into the consent record, consent evidence and access log tables.
 * Such inserts must run inside a transaction (use `inTransaction`), or the head could not be locked with the row.
 */
@EventSubscriber()
export class ChainSubscriber implements EntitySubscriberInterface {
  beforeInsert(event: InsertEvent<Record<string, unknown>>): Promise<void> | void {
    const chain = chainOfTable(event.metadata.tableName);
    if (!chain) return;
    if (!event.queryRunner.isTransactionActive) {
      throw new Error(`Rows of ${chain.table} are chained: insert them inside a transaction (inTransaction).`);
    }
    const row = event.entity;
    // A column left out takes its default in the database; hash the value that will be stored.
    for (const col of event.metadata.columns) {
      if (row[col.propertyName] === undefined && col.propertyName in chain.columns) row[col.propertyName] = col.default ?? null;
    }
    return serialised(event.queryRunner, () => append(event.queryRunner, chain, row));
  }
}

/** Runs `fn` in the caller's open transaction, or in a new one. */
export function inTransaction<T>(db: DataSource | EntityManager, fn: (tx: EntityManager) => Promise<T>): Promise<T> {
  if (db instanceof EntityManager && db.queryRunner?.isTransactionActive) return fn(db);
  return db.transaction(fn);
}

/**
 * Keeps a chained row's place before a patient's erasure deletes it: its seq, id and hashes, no content.
 * Call it inside the erasure transaction for every row deleted from a chained table.
 */
export async function keepTombstone(tx: EntityManager, table: string, row: Record<string, unknown>, erasureId: string): Promise<void> {
  const chain = chainOfTable(table);
  if (!chain || row.chainSeq === null || row.chainSeq === undefined) return;
  await tx.getRepository(ChainTombstone).insert({
    chain: chain.name,
    seq: Number(row.chainSeq),
    rowId: String(row.id),
    prevHash: String(row.prevHash),
    rowHash: String(row.rowHash),
    erasureId,
    erasedAt: nowIso(),
  });
}
