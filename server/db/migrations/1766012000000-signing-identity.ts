import type { MigrationInterface, QueryRunner } from 'typeorm';

/** The clinic's PDF signing identity (created at first start unless a certificate is configured). */
export class SigningIdentity1766012000000 implements MigrationInterface {
  name = 'SigningIdentity1766012000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE "signing_identity" (
      "id" varchar(16) PRIMARY KEY NOT NULL,
      "p12" text NOT NULL,
      "certificatePem" text NOT NULL,
      "fingerprint" varchar(64) NOT NULL,
      "createdAt" varchar(30) NOT NULL)`);
    // Replacing the key would silently change who signed later documents: never in place.
    await q.query(`CREATE TRIGGER "signing_identity_no_update" BEFORE UPDATE ON "signing_identity"
      BEGIN SELECT RAISE(ABORT, 'signing_identity is immutable'); END`);
    await q.query(`CREATE TRIGGER "signing_identity_no_delete" BEFORE DELETE ON "signing_identity"
      BEGIN SELECT RAISE(ABORT, 'signing_identity is immutable'); END`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE "signing_identity"`);
  }
}
