import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Complication episodes of a treatment, their timed actions (never changed once written) and follow-ups. */
export class Complications1766014000002 implements MigrationInterface {
  name = 'Complications1766014000002';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE "complication_episode" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "patientId" varchar(36) NOT NULL,
      "treatmentId" varchar(36) NOT NULL,
      "visitId" varchar(36) NOT NULL,
      "startedAt" varchar(30) NOT NULL,
      "startedById" varchar(36) NOT NULL,
      "onsetAt" varchar(30) NOT NULL,
      "signs" text NOT NULL DEFAULT ('[]'),
      "signsNotes" text NOT NULL DEFAULT (''),
      "outcome" varchar(24),
      "outcomeNotes" text NOT NULL DEFAULT (''),
      "outcomeAt" varchar(30),
      "updatedAt" varchar(30) NOT NULL,
      CONSTRAINT "CHK_episode_outcome" CHECK ("outcome" IS NULL OR "outcome" IN ('ongoing', 'improving', 'resolved', 'resolved-with-sequelae', 'referred')),
      CONSTRAINT "FK_episode_patient" FOREIGN KEY ("patientId") REFERENCES "patient" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_episode_treatment" FOREIGN KEY ("treatmentId") REFERENCES "treatment" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_episode_visit" FOREIGN KEY ("visitId") REFERENCES "visit" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_episode_user" FOREIGN KEY ("startedById") REFERENCES "user" ("id"))`);
    await q.query(`CREATE INDEX "IDX_episode_patient" ON "complication_episode" ("patientId", "startedAt")`);
    await q.query(`CREATE INDEX "IDX_episode_treatment" ON "complication_episode" ("treatmentId")`);

    await q.query(`CREATE TABLE "complication_action" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "episodeId" varchar(36) NOT NULL,
      "at" varchar(30) NOT NULL,
      "kind" varchar(16) NOT NULL,
      "description" text NOT NULL DEFAULT (''),
      "productId" varchar(36),
      "productName" varchar(120),
      "unitLabel" varchar(40),
      "lotNumber" varchar(40),
      "expiryDate" varchar(10),
      "amountMilli" integer,
      "stockLotId" varchar(36),
      "recordedById" varchar(36) NOT NULL,
      "recordedAt" varchar(30) NOT NULL,
      CONSTRAINT "CHK_action_kind" CHECK ("kind" IN ('hyaluronidase', 'medication', 'referral', 'other-care')),
      CONSTRAINT "CHK_action_hyaluronidase" CHECK ("kind" <> 'hyaluronidase' OR ("productId" IS NOT NULL AND "lotNumber" IS NOT NULL AND "amountMilli" > 0)),
      CONSTRAINT "FK_action_episode" FOREIGN KEY ("episodeId") REFERENCES "complication_episode" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_action_product" FOREIGN KEY ("productId") REFERENCES "product" ("id"),
      CONSTRAINT "FK_action_user" FOREIGN KEY ("recordedById") REFERENCES "user" ("id"))`);
    await q.query(`CREATE INDEX "IDX_action_episode" ON "complication_action" ("episodeId", "at")`);
    await q.query(`CREATE TRIGGER "complication_action_no_update" BEFORE UPDATE ON "complication_action"
      BEGIN SELECT RAISE(ABORT, 'complication_action is append-only'); END`);

    await q.query(`CREATE TABLE "complication_follow_up" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "episodeId" varchar(36) NOT NULL,
      "visitId" varchar(36),
      "at" varchar(30) NOT NULL,
      "notes" text NOT NULL DEFAULT (''),
      "recordedById" varchar(36) NOT NULL,
      "recordedAt" varchar(30) NOT NULL,
      CONSTRAINT "FK_follow_up_episode" FOREIGN KEY ("episodeId") REFERENCES "complication_episode" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_follow_up_visit" FOREIGN KEY ("visitId") REFERENCES "visit" ("id") ON DELETE SET NULL,
      CONSTRAINT "FK_follow_up_user" FOREIGN KEY ("recordedById") REFERENCES "user" ("id"))`);
    await q.query(`CREATE INDEX "IDX_follow_up_episode" ON "complication_follow_up" ("episodeId", "at")`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE "complication_follow_up"`);
    await q.query(`DROP TABLE "complication_action"`);
    await q.query(`DROP TABLE "complication_episode"`);
  }
}
