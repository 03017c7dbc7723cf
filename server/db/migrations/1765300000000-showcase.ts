import type { MigrationInterface, QueryRunner } from 'typeorm';

export class Showcase1765300000000 implements MigrationInterface {
  name = 'Showcase1765300000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE "showcase_request" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "patientId" varchar(36) NOT NULL,
      "viewKey" varchar(40) NOT NULL,
      "photoIds" text NOT NULL,
      "channels" text NOT NULL,
      "crop" varchar(12) NOT NULL,
      "consentId" varchar(36) NOT NULL,
      "state" varchar(12) NOT NULL,
      "requestNote" text NOT NULL DEFAULT (''),
      "requestedById" varchar(36) NOT NULL,
      "requestedAt" varchar(30) NOT NULL,
      "decidedById" varchar(36),
      "decidedAt" varchar(30),
      "decisionNote" text,
      "withdrawnAt" varchar(30),
      "withdrawnReason" text,
      CONSTRAINT "CHK_showcase_state" CHECK ("state" IN ('requested', 'cleared', 'declined', 'withdrawn')),
      CONSTRAINT "CHK_showcase_crop" CHECK ("crop" IN ('face', 'lips-only')),
      CONSTRAINT "FK_showcase_patient" FOREIGN KEY ("patientId") REFERENCES "patient" ("id"),
      CONSTRAINT "FK_showcase_consent" FOREIGN KEY ("consentId") REFERENCES "consent_record" ("id"),
      CONSTRAINT "FK_showcase_requested_by" FOREIGN KEY ("requestedById") REFERENCES "user" ("id"))`);
    await q.query(`CREATE INDEX "IDX_showcase_state" ON "showcase_request" ("state", "requestedAt")`);
    await q.query(`CREATE INDEX "IDX_showcase_patient" ON "showcase_request" ("patientId")`);
    // A decision is final: only requested → cleared/declined and cleared → withdrawn are allowed.
    await q.query(`CREATE TRIGGER "showcase_request_transitions" BEFORE UPDATE OF "state" ON "showcase_request"
      WHEN NOT ((OLD."state" = 'requested' AND NEW."state" IN ('cleared', 'declined', 'withdrawn'))
             OR (OLD."state" = 'cleared' AND NEW."state" = 'withdrawn')
             OR OLD."state" = NEW."state")
      BEGIN SELECT RAISE(ABORT, 'showcase request state change not allowed'); END`);
    await q.query(`CREATE TABLE "showcase_export" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "requestId" varchar(36) NOT NULL,
      "patientId" varchar(36) NOT NULL,
      "channel" varchar(30) NOT NULL,
      "exportedById" varchar(36) NOT NULL,
      "exportedAt" varchar(30) NOT NULL,
      "files" text NOT NULL,
      CONSTRAINT "FK_export_request" FOREIGN KEY ("requestId") REFERENCES "showcase_request" ("id"),
      CONSTRAINT "FK_export_patient" FOREIGN KEY ("patientId") REFERENCES "patient" ("id"))`);
    await q.query(`CREATE INDEX "IDX_export_request" ON "showcase_export" ("requestId")`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE "showcase_export"`);
    await q.query(`DROP TABLE "showcase_request"`);
  }
}
