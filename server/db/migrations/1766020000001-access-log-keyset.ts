import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * The access log read by keyset (newest first by time, then id) at a million rows and more: an index in exactly that
 * order, which replaces the one on time alone, and one for filtering by action (a prefix, read as a range).
 */
export class AccessLogKeyset1766020000001 implements MigrationInterface {
  name = 'AccessLogKeyset1766020000001';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE INDEX "IDX_audit_at_id" ON "audit_event" ("at", "id")`);
    await q.query(`DROP INDEX "IDX_audit_at"`);
    await q.query(`CREATE INDEX "IDX_audit_action_at" ON "audit_event" ("action", "at")`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP INDEX "IDX_audit_action_at"`);
    await q.query(`CREATE INDEX "IDX_audit_at" ON "audit_event" ("at")`);
    await q.query(`DROP INDEX "IDX_audit_at_id"`);
  }
}
