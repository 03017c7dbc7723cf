import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Sessions that end: each user's sign-ins from before `sessionsValidFrom` are no longer honoured (set on a password
 * reset, role change, deactivation or "sign out everywhere"), and the clinic sets an absolute session lifetime.
 */
export class Sessions1766019000001 implements MigrationInterface {
  name = 'Sessions1766019000001';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE "user" ADD COLUMN "sessionsValidFrom" varchar(30)`);
    await q.query(`ALTER TABLE "clinic_settings" ADD COLUMN "sessionHours" integer NOT NULL DEFAULT (12)`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE "clinic_settings" DROP COLUMN "sessionHours"`);
    await q.query(`ALTER TABLE "user" DROP COLUMN "sessionsValidFrom"`);
  }
}
