import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Patient erasure. Consent records and their evidence refuse deletion, except inside an erasure that an admin
 * started after the retention check: the erasure row is written in the same transaction and marked finished after.
 */
export class Erasure1765200000000 implements MigrationInterface {
  name = 'Erasure1765200000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE "patient_erasure" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "patientId" varchar(36) NOT NULL,
      "erasedById" varchar(36) NOT NULL,
      "startedAt" varchar(30) NOT NULL,
      "finishedAt" varchar(30),
      "objectCount" integer NOT NULL DEFAULT (0),
      "rowCount" integer NOT NULL DEFAULT (0))`);
    const unlessErasing = `WHEN NOT EXISTS (SELECT 1 FROM "patient_erasure" WHERE "finishedAt" IS NULL)`;
    await q.query(`DROP TRIGGER "consent_record_no_delete"`);
    await q.query(`CREATE TRIGGER "consent_record_no_delete" BEFORE DELETE ON "consent_record" ${unlessErasing}
      BEGIN SELECT RAISE(ABORT, 'consent_record is immutable'); END`);
    await q.query(`DROP TRIGGER "consent_evidence_no_delete"`);
    await q.query(`CREATE TRIGGER "consent_evidence_no_delete" BEFORE DELETE ON "consent_evidence" ${unlessErasing}
      BEGIN SELECT RAISE(ABORT, 'consent_evidence is append-only'); END`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TRIGGER "consent_record_no_delete"`);
    await q.query(`CREATE TRIGGER "consent_record_no_delete" BEFORE DELETE ON "consent_record" BEGIN SELECT RAISE(ABORT, 'consent_record is immutable'); END`);
    await q.query(`DROP TRIGGER "consent_evidence_no_delete"`);
    await q.query(`CREATE TRIGGER "consent_evidence_no_delete" BEFORE DELETE ON "consent_evidence" BEGIN SELECT RAISE(ABORT, 'consent_evidence is append-only'); END`);
    await q.query(`DROP TABLE "patient_erasure"`);
  }
}
