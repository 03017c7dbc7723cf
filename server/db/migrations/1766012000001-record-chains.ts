import type { MigrationInterface, QueryRunner } from 'typeorm';
import { CHAINS, GENESIS, linkHash, rowHashOf } from '../../features/integrity/chain.js';

/** Columns of consent_record that may never change after insert: the earlier list plus the chain columns. */
const CONSENT_FIXED = [
  'id', 'patientId', 'templateId', 'kind', 'templateVersion', 'templateSha256', 'handoverId', 'visitId', 'answers',
  'channels', 'crop', 'flaggedQuestionIds', 'signerName', 'nameMatchesPatient', 'signatureKey', 'signatureSha256',
  'pdfKey', 'pdfSha256', 'contentSha256', 'timeZone', 'shownAt', 'signedAt', 'startedById', 'signedIp', 'signedUserAgent',
  'chainSeq', 'prevHash', 'rowHash',
];
const same = (cols: string[]) => cols.map((c) => `NEW."${c}" IS OLD."${c}"`).join(' AND ');

/**
 * Tamper-evident chains over consent records, consent evidence and the access log: chain columns on each row,
 * one head per chain, tombstones kept by erasure, and the daily digests of the heads. Rows written before this
 * migration are chained here in the order they were written (their time, then id).
 */
export class RecordChains1766012000001 implements MigrationInterface {
  name = 'RecordChains1766012000001';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE "chain_head" (
      "chain" varchar(20) PRIMARY KEY NOT NULL,
      "seq" integer NOT NULL,
      "hash" varchar(64) NOT NULL,
      "updatedAt" varchar(30) NOT NULL)`);
    await q.query(`CREATE TRIGGER "chain_head_forward_only" BEFORE UPDATE ON "chain_head"
      WHEN NEW."seq" < OLD."seq" OR NEW."chain" IS NOT OLD."chain"
      BEGIN SELECT RAISE(ABORT, 'a chain head only moves forward'); END`);
    await q.query(`CREATE TRIGGER "chain_head_no_delete" BEFORE DELETE ON "chain_head"
      BEGIN SELECT RAISE(ABORT, 'a chain head cannot be deleted'); END`);

    // The one-row-per-update triggers of the chained tables are replaced while the existing rows get their hashes.
    await q.query(`DROP TRIGGER "consent_record_withdraw_once"`);
    await q.query(`DROP TRIGGER "consent_evidence_no_update"`);
    await q.query(`DROP TRIGGER "audit_event_no_update"`);
    const now = new Date().toISOString();
    for (const chain of Object.values(CHAINS)) {
      await q.query(`ALTER TABLE "${chain.table}" ADD COLUMN "chainSeq" integer`);
      await q.query(`ALTER TABLE "${chain.table}" ADD COLUMN "prevHash" varchar(64)`);
      await q.query(`ALTER TABLE "${chain.table}" ADD COLUMN "rowHash" varchar(64)`);
      await q.query(`CREATE UNIQUE INDEX "IDX_${chain.table}_chain_seq" ON "${chain.table}" ("chainSeq")`);
      const rows: Record<string, unknown>[] = await q.query(`SELECT * FROM "${chain.table}" ORDER BY "${chain.orderBy}", "id"`);
      let prev = GENESIS;
      let seq = 0;
      for (const row of rows) {
        seq += 1;
        const rowHash = rowHashOf(chain, seq, row);
        await q.query(`UPDATE "${chain.table}" SET "chainSeq" = ?, "prevHash" = ?, "rowHash" = ? WHERE "id" = ?`, [seq, prev, rowHash, row.id]);
        prev = linkHash(prev, rowHash);
      }
      await q.query(`INSERT INTO "chain_head" ("chain", "seq", "hash", "updatedAt") VALUES (?, ?, ?, ?)`, [chain.name, seq, prev, now]);
    }
    await q.query(`CREATE TRIGGER "consent_record_withdraw_once" BEFORE UPDATE ON "consent_record"
      WHEN NOT (${same(CONSENT_FIXED)}
        AND OLD."withdrawnAt" IS NULL AND OLD."withdrawnById" IS NULL AND OLD."withdrawalReason" IS NULL AND OLD."withdrawalDate" IS NULL
        AND NEW."withdrawnAt" IS NOT NULL AND NEW."withdrawnById" IS NOT NULL AND NEW."withdrawalReason" IS NOT NULL AND NEW."withdrawalDate" IS NOT NULL)
      BEGIN SELECT RAISE(ABORT, 'consent_record is immutable except a single withdrawal'); END`);
    await q.query(`CREATE TRIGGER "consent_evidence_no_update" BEFORE UPDATE ON "consent_evidence"
      BEGIN SELECT RAISE(ABORT, 'consent_evidence is append-only'); END`);
    await q.query(`CREATE TRIGGER "audit_event_no_update" BEFORE UPDATE ON "audit_event"
      BEGIN SELECT RAISE(ABORT, 'audit_event is append-only'); END`);

    await q.query(`CREATE TABLE "chain_tombstone" (
      "chain" varchar(20) NOT NULL,
      "seq" integer NOT NULL,
      "rowId" varchar(36) NOT NULL,
      "prevHash" varchar(64) NOT NULL,
      "rowHash" varchar(64) NOT NULL,
      "erasureId" varchar(36) NOT NULL,
      "erasedAt" varchar(30) NOT NULL,
      PRIMARY KEY ("chain", "seq"),
      CONSTRAINT "FK_tombstone_erasure" FOREIGN KEY ("erasureId") REFERENCES "patient_erasure" ("id"))`);
    // A tombstone stands in for a deleted row, so it may only be written while an erasure is running.
    await q.query(`CREATE TRIGGER "chain_tombstone_only_when_erasing" BEFORE INSERT ON "chain_tombstone"
      WHEN NOT EXISTS (SELECT 1 FROM "patient_erasure" WHERE "id" = NEW."erasureId" AND "finishedAt" IS NULL)
      BEGIN SELECT RAISE(ABORT, 'a chain tombstone is written only by a running erasure'); END`);
    await q.query(`CREATE TRIGGER "chain_tombstone_no_update" BEFORE UPDATE ON "chain_tombstone"
      BEGIN SELECT RAISE(ABORT, 'chain_tombstone is append-only'); END`);
    await q.query(`CREATE TRIGGER "chain_tombstone_no_delete" BEFORE DELETE ON "chain_tombstone"
      BEGIN SELECT RAISE(ABORT, 'chain_tombstone is append-only'); END`);

    await q.query(`CREATE TABLE "chain_digest" (
      "day" varchar(10) PRIMARY KEY NOT NULL,
      "createdAt" varchar(30) NOT NULL,
      "heads" text NOT NULL,
      "recipients" integer NOT NULL)`);
    await q.query(`CREATE TRIGGER "chain_digest_no_update" BEFORE UPDATE ON "chain_digest"
      BEGIN SELECT RAISE(ABORT, 'chain_digest is append-only'); END`);
    await q.query(`CREATE TRIGGER "chain_digest_no_delete" BEFORE DELETE ON "chain_digest"
      BEGIN SELECT RAISE(ABORT, 'chain_digest is append-only'); END`);

    // The public verify page looks consent records up by the SHA-256 of their PDF.
    await q.query(`CREATE INDEX "IDX_consent_pdf_sha256" ON "consent_record" ("pdfSha256")`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP INDEX "IDX_consent_pdf_sha256"`);
    for (const table of ['chain_digest', 'chain_tombstone', 'chain_head']) await q.query(`DROP TABLE "${table}"`);
    await q.query(`DROP TRIGGER "consent_record_withdraw_once"`);
    for (const chain of Object.values(CHAINS)) {
      await q.query(`DROP INDEX "IDX_${chain.table}_chain_seq"`);
      for (const col of ['chainSeq', 'prevHash', 'rowHash']) await q.query(`ALTER TABLE "${chain.table}" DROP COLUMN "${col}"`);
    }
    const fixed = CONSENT_FIXED.filter((c) => !['chainSeq', 'prevHash', 'rowHash'].includes(c));
    await q.query(`CREATE TRIGGER "consent_record_withdraw_once" BEFORE UPDATE ON "consent_record"
      WHEN NOT (${same(fixed)}
        AND OLD."withdrawnAt" IS NULL AND OLD."withdrawnById" IS NULL AND OLD."withdrawalReason" IS NULL AND OLD."withdrawalDate" IS NULL
        AND NEW."withdrawnAt" IS NOT NULL AND NEW."withdrawnById" IS NOT NULL AND NEW."withdrawalReason" IS NOT NULL AND NEW."withdrawalDate" IS NOT NULL)
      BEGIN SELECT RAISE(ABORT, 'consent_record is immutable except a single withdrawal'); END`);
  }
}
