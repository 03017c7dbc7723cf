import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Clinic settings for the complication protocol pointer, prescriber records, treatment cards and toxin reminders. */
export class TraceabilitySettings1766014000003 implements MigrationInterface {
  name = 'TraceabilitySettings1766014000003';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE "clinic_settings" ADD COLUMN "complicationProtocol" varchar(500) NOT NULL DEFAULT ('')`);
    await q.query(`ALTER TABLE "clinic_settings" ADD COLUMN "prescriberRequired" boolean NOT NULL DEFAULT (false)`);
    await q.query(`ALTER TABLE "clinic_settings" ADD COLUMN "treatmentCardEmail" boolean NOT NULL DEFAULT (false)`);
    await q.query(`ALTER TABLE "clinic_settings" ADD COLUMN "toxinMaintenanceMonths" integer NOT NULL DEFAULT (3)`);
  }

  async down(q: QueryRunner): Promise<void> {
    for (const c of ['toxinMaintenanceMonths', 'treatmentCardEmail', 'prescriberRequired', 'complicationProtocol']) await q.query(`ALTER TABLE "clinic_settings" DROP COLUMN "${c}"`);
  }
}
