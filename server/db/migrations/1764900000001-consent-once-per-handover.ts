import type { MigrationInterface, QueryRunner } from 'typeorm';

/** A form of a hand-over is signed at most once, even when two submissions race. */
export class ConsentOncePerHandover1764900000001 implements MigrationInterface {
  name = 'ConsentOncePerHandover1764900000001';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE UNIQUE INDEX "UQ_consent_handover_template" ON "consent_record" ("handoverId", "templateId")`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP INDEX "UQ_consent_handover_template"`);
  }
}
