import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Rate-limit counters in the database, so a limit holds across app instances (the public verify page uses it). */
export class RateLimit1766012000002 implements MigrationInterface {
  name = 'RateLimit1766012000002';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE "rate_limit" (
      "key" varchar(200) PRIMARY KEY NOT NULL,
      "hits" integer NOT NULL,
      "resetAt" varchar(30) NOT NULL)`);
    await q.query(`CREATE INDEX "IDX_rate_limit_reset" ON "rate_limit" ("resetAt")`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE "rate_limit"`);
  }
}
