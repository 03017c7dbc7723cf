import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Columns of consent_record that may never change after insert (everything but the withdrawal fields). */
const CONSENT_FIXED = [
  'id', 'patientId', 'templateId', 'kind', 'templateVersion', 'templateSha256', 'handoverId', 'visitId', 'answers',
  'channels', 'crop', 'flaggedQuestionIds', 'signerName', 'nameMatchesPatient', 'signatureKey', 'signatureSha256',
  'pdfKey', 'pdfSha256', 'contentSha256', 'timeZone', 'shownAt', 'signedAt', 'startedById', 'signedIp', 'signedUserAgent',
];

/** Columns of consent_template frozen once a version leaves draft. */
const TEMPLATE_FIXED = [
  'id', 'familyId', 'kind', 'version', 'title', 'body', 'questions', 'channels', 'sha256', 'createdById', 'createdAt',
  'publishedAt', 'publishedById',
];

const same = (cols: string[]) => cols.map((c) => `NEW."${c}" IS OLD."${c}"`).join(' AND ');

export class Consents1764900000000 implements MigrationInterface {
  name = 'Consents1764900000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE "mail_log" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "to" varchar(254) NOT NULL,
      "subject" varchar(200) NOT NULL,
      "text" text NOT NULL,
      "html" text,
      "attachments" text NOT NULL DEFAULT ('[]'),
      "state" varchar(10) NOT NULL DEFAULT ('pending'),
      "attempts" integer NOT NULL DEFAULT (0),
      "nextAttemptAt" varchar(30) NOT NULL,
      "claimToken" varchar(36),
      "claimedUntil" varchar(30),
      "sentAt" varchar(30),
      "messageId" varchar(300),
      "lastError" text,
      "relatedType" varchar(40),
      "relatedId" varchar(36),
      "patientId" varchar(36),
      "createdAt" varchar(30) NOT NULL)`);
    await q.query(`CREATE INDEX "IDX_mail_log_state_next" ON "mail_log" ("state", "nextAttemptAt")`);
    await q.query(`CREATE INDEX "IDX_mail_log_related" ON "mail_log" ("relatedType", "relatedId")`);

    await q.query(`CREATE TABLE "consent_template" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "familyId" varchar(36) NOT NULL,
      "kind" varchar(20) NOT NULL,
      "version" integer NOT NULL,
      "title" varchar(200) NOT NULL,
      "body" text NOT NULL,
      "questions" text NOT NULL DEFAULT ('[]'),
      "channels" text NOT NULL DEFAULT ('[]'),
      "status" varchar(12) NOT NULL DEFAULT ('draft'),
      "sha256" varchar(64),
      "createdById" varchar(36),
      "createdAt" varchar(30) NOT NULL,
      "updatedAt" varchar(30) NOT NULL,
      "publishedAt" varchar(30),
      "publishedById" varchar(36),
      "retiredAt" varchar(30),
      "retiredById" varchar(36),
      CONSTRAINT "CHK_template_status" CHECK ("status" IN ('draft', 'published', 'retired')),
      CONSTRAINT "CHK_template_hash" CHECK ("status" = 'draft' OR ("sha256" IS NOT NULL AND "publishedAt" IS NOT NULL)),
      CONSTRAINT "FK_template_created_by" FOREIGN KEY ("createdById") REFERENCES "user" ("id"))`);
    await q.query(`CREATE UNIQUE INDEX "IDX_template_family_version" ON "consent_template" ("familyId", "version")`);
    await q.query(`CREATE INDEX "IDX_template_kind_status" ON "consent_template" ("kind", "status")`);
    // A published version is a fixed text that records point to: only its retirement may be recorded, once.
    await q.query(`CREATE TRIGGER "consent_template_frozen" BEFORE UPDATE ON "consent_template"
      WHEN OLD."status" <> 'draft' AND NOT (${same(TEMPLATE_FIXED)}
        AND NEW."status" IN ('published', 'retired')
        AND (OLD."status" = 'published' OR NEW."status" = 'retired')
        AND (OLD."retiredAt" IS NULL OR (NEW."retiredAt" IS OLD."retiredAt" AND NEW."retiredById" IS OLD."retiredById")))
      BEGIN SELECT RAISE(ABORT, 'a published consent template is immutable; create a new version'); END`);
    await q.query(`CREATE TRIGGER "consent_template_keep_published" BEFORE DELETE ON "consent_template"
      WHEN OLD."status" <> 'draft'
      BEGIN SELECT RAISE(ABORT, 'a published consent template cannot be deleted'); END`);

    await q.query(`CREATE TABLE "handover_session" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "tokenHash" varchar(64) NOT NULL,
      "codeHash" varchar(64),
      "mode" varchar(20) NOT NULL,
      "patientId" varchar(36) NOT NULL,
      "visitId" varchar(36),
      "templateIds" text NOT NULL,
      "progress" text NOT NULL DEFAULT ('{}'),
      "expiresAt" varchar(30) NOT NULL,
      "createdById" varchar(36) NOT NULL,
      "createdAt" varchar(30) NOT NULL,
      "createdIp" varchar(64),
      "createdUserAgent" varchar(300),
      "claimedAt" varchar(30),
      "claimedIp" varchar(64),
      "claimedUserAgent" varchar(300),
      "completedAt" varchar(30),
      "cancelledAt" varchar(30),
      CONSTRAINT "UQ_handover_token" UNIQUE ("tokenHash"),
      CONSTRAINT "FK_handover_patient" FOREIGN KEY ("patientId") REFERENCES "patient" ("id"),
      CONSTRAINT "FK_handover_visit" FOREIGN KEY ("visitId") REFERENCES "visit" ("id"),
      CONSTRAINT "FK_handover_created_by" FOREIGN KEY ("createdById") REFERENCES "user" ("id"))`);
    await q.query(`CREATE INDEX "IDX_handover_code" ON "handover_session" ("codeHash")`);
    await q.query(`CREATE INDEX "IDX_handover_patient" ON "handover_session" ("patientId")`);

    await q.query(`CREATE TABLE "consent_record" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "patientId" varchar(36) NOT NULL,
      "templateId" varchar(36) NOT NULL,
      "kind" varchar(20) NOT NULL,
      "templateVersion" integer NOT NULL,
      "templateSha256" varchar(64) NOT NULL,
      "handoverId" varchar(36),
      "visitId" varchar(36),
      "answers" text NOT NULL DEFAULT ('{}'),
      "channels" text NOT NULL DEFAULT ('[]'),
      "crop" varchar(12),
      "flaggedQuestionIds" text NOT NULL DEFAULT ('[]'),
      "signerName" varchar(200) NOT NULL,
      "nameMatchesPatient" boolean NOT NULL,
      "signatureKey" varchar(300) NOT NULL,
      "signatureSha256" varchar(64) NOT NULL,
      "pdfKey" varchar(300) NOT NULL,
      "pdfSha256" varchar(64) NOT NULL,
      "contentSha256" varchar(64) NOT NULL,
      "timeZone" varchar(64) NOT NULL,
      "shownAt" varchar(30),
      "signedAt" varchar(30) NOT NULL,
      "startedById" varchar(36),
      "signedIp" varchar(64),
      "signedUserAgent" varchar(300),
      "withdrawnAt" varchar(30),
      "withdrawnById" varchar(36),
      "withdrawalReason" text,
      "withdrawalDate" varchar(10),
      CONSTRAINT "FK_consent_patient" FOREIGN KEY ("patientId") REFERENCES "patient" ("id"),
      CONSTRAINT "FK_consent_template" FOREIGN KEY ("templateId") REFERENCES "consent_template" ("id"),
      CONSTRAINT "FK_consent_handover" FOREIGN KEY ("handoverId") REFERENCES "handover_session" ("id"),
      CONSTRAINT "FK_consent_visit" FOREIGN KEY ("visitId") REFERENCES "visit" ("id"))`);
    await q.query(`CREATE INDEX "IDX_consent_patient_kind_signed" ON "consent_record" ("patientId", "kind", "signedAt")`);
    // A signed consent is never edited or deleted; withdrawal is the one fact that may be added, once.
    await q.query(`CREATE TRIGGER "consent_record_no_delete" BEFORE DELETE ON "consent_record"
      BEGIN SELECT RAISE(ABORT, 'consent_record is immutable'); END`);
    await q.query(`CREATE TRIGGER "consent_record_withdraw_once" BEFORE UPDATE ON "consent_record"
      WHEN NOT (${same(CONSENT_FIXED)}
        AND OLD."withdrawnAt" IS NULL AND OLD."withdrawnById" IS NULL AND OLD."withdrawalReason" IS NULL AND OLD."withdrawalDate" IS NULL
        AND NEW."withdrawnAt" IS NOT NULL AND NEW."withdrawnById" IS NOT NULL AND NEW."withdrawalReason" IS NOT NULL AND NEW."withdrawalDate" IS NOT NULL)
      BEGIN SELECT RAISE(ABORT, 'consent_record is immutable except a single withdrawal'); END`);

    await q.query(`CREATE TABLE "consent_evidence" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "consentId" varchar(36) NOT NULL,
      "at" varchar(30) NOT NULL,
      "event" varchar(40) NOT NULL,
      "actorId" varchar(36),
      "actorRole" varchar(20) NOT NULL,
      "ip" varchar(64),
      "userAgent" varchar(300),
      "details" text NOT NULL DEFAULT ('{}'),
      CONSTRAINT "FK_evidence_consent" FOREIGN KEY ("consentId") REFERENCES "consent_record" ("id"))`);
    await q.query(`CREATE INDEX "IDX_evidence_consent_at" ON "consent_evidence" ("consentId", "at")`);
    await q.query(`CREATE TRIGGER "consent_evidence_no_update" BEFORE UPDATE ON "consent_evidence"
      BEGIN SELECT RAISE(ABORT, 'consent_evidence is append-only'); END`);
    await q.query(`CREATE TRIGGER "consent_evidence_no_delete" BEFORE DELETE ON "consent_evidence"
      BEGIN SELECT RAISE(ABORT, 'consent_evidence is append-only'); END`);
  }

  async down(q: QueryRunner): Promise<void> {
    for (const table of ['consent_evidence', 'consent_record', 'handover_session', 'consent_template', 'mail_log']) {
      await q.query(`DROP TABLE "${table}"`);
    }
  }
}
