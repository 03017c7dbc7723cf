import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Erasure as a per-patient journal. The consent delete triggers open only for the patient whose erasure row is
 * unfinished (before, any unfinished erasure opened them for every patient). A withdrawal can only be recorded
 * after its `consent.withdrawn` evidence row.
 */
export class ErasureJournal1766019000000 implements MigrationInterface {
  name = 'ErasureJournal1766019000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE "patient_erasure" ADD COLUMN "reason" text`);
    await q.query(`CREATE INDEX "IDX_patient_erasure_open" ON "patient_erasure" ("patientId", "finishedAt")`);
    await q.query(`DROP TRIGGER "consent_record_no_delete"`);
    await q.query(`CREATE TRIGGER "consent_record_no_delete" BEFORE DELETE ON "consent_record"
      WHEN NOT EXISTS (SELECT 1 FROM "patient_erasure" e WHERE e."finishedAt" IS NULL AND e."patientId" = OLD."patientId")
      BEGIN SELECT RAISE(ABORT, 'consent_record is immutable'); END`);
    await q.query(`DROP TRIGGER "consent_evidence_no_delete"`);
    await q.query(`CREATE TRIGGER "consent_evidence_no_delete" BEFORE DELETE ON "consent_evidence"
      WHEN NOT EXISTS (SELECT 1 FROM "patient_erasure" e JOIN "consent_record" c ON c."patientId" = e."patientId"
        WHERE e."finishedAt" IS NULL AND c."id" = OLD."consentId")
      BEGIN SELECT RAISE(ABORT, 'consent_evidence is append-only'); END`);
    await q.query(`CREATE TRIGGER "consent_record_withdrawal_evidence" BEFORE UPDATE OF "withdrawnAt" ON "consent_record"
      WHEN OLD."withdrawnAt" IS NULL AND NEW."withdrawnAt" IS NOT NULL
        AND NOT EXISTS (SELECT 1 FROM "consent_evidence" WHERE "consentId" = NEW."id" AND "event" = 'consent.withdrawn')
      BEGIN SELECT RAISE(ABORT, 'a withdrawal needs its consent.withdrawn evidence row first'); END`);
  }

  async down(q: QueryRunner): Promise<void> {
    const unlessErasing = `WHEN NOT EXISTS (SELECT 1 FROM "patient_erasure" WHERE "finishedAt" IS NULL)`;
    await q.query(`DROP TRIGGER "consent_record_withdrawal_evidence"`);
    await q.query(`DROP TRIGGER "consent_record_no_delete"`);
    await q.query(`CREATE TRIGGER "consent_record_no_delete" BEFORE DELETE ON "consent_record" ${unlessErasing}
      BEGIN SELECT RAISE(ABORT, 'consent_record is immutable'); END`);
    await q.query(`DROP TRIGGER "consent_evidence_no_delete"`);
    await q.query(`CREATE TRIGGER "consent_evidence_no_delete" BEFORE DELETE ON "consent_evidence" ${unlessErasing}
      BEGIN SELECT RAISE(ABORT, 'consent_evidence is append-only'); END`);
    await q.query(`DROP INDEX "IDX_patient_erasure_open"`);
    await q.query(`ALTER TABLE "patient_erasure" DROP COLUMN "reason"`);
  }
}
