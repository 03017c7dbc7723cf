import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Product catalogue, consultations, treatments with lines and per-zone doses, reminders, patients' reference pictures. */
export class Treatments1765000000000 implements MigrationInterface {
  name = 'Treatments1765000000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE "product" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "name" varchar(120) NOT NULL,
      "kind" varchar(10) NOT NULL,
      "unit" varchar(4) NOT NULL,
      "manufacturer" varchar(120) NOT NULL,
      "packSize" real,
      "active" boolean NOT NULL DEFAULT (1),
      "createdAt" varchar(30) NOT NULL,
      "updatedAt" varchar(30) NOT NULL,
      CONSTRAINT "CHK_product_kind_unit" CHECK (("kind" = 'filler' AND "unit" = 'mL') OR ("kind" = 'toxin' AND "unit" = 'U')))`);

    await q.query(`CREATE TABLE "consultation" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "visitId" varchar(36) NOT NULL,
      "patientId" varchar(36) NOT NULL,
      "goals" text NOT NULL DEFAULT ('[]'),
      "goalsText" text NOT NULL DEFAULT (''),
      "targetRatio" varchar(8),
      "customRatio" real,
      "expectations" text NOT NULL DEFAULT (''),
      "plan" text NOT NULL DEFAULT ('[]'),
      "recordedById" varchar(36) NOT NULL,
      "createdAt" varchar(30) NOT NULL,
      "updatedAt" varchar(30) NOT NULL,
      CONSTRAINT "UQ_consultation_visit" UNIQUE ("visitId"),
      CONSTRAINT "FK_consultation_visit" FOREIGN KEY ("visitId") REFERENCES "visit" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_consultation_patient" FOREIGN KEY ("patientId") REFERENCES "patient" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_consultation_user" FOREIGN KEY ("recordedById") REFERENCES "user" ("id"))`);
    await q.query(`CREATE INDEX "IDX_consultation_patient" ON "consultation" ("patientId", "createdAt")`);

    await q.query(`CREATE TABLE "treatment" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "visitId" varchar(36) NOT NULL,
      "patientId" varchar(36) NOT NULL,
      "practitionerId" varchar(36) NOT NULL,
      "treatedAt" varchar(30) NOT NULL,
      "treatedOn" varchar(10) NOT NULL,
      "anaesthetic" varchar(24) NOT NULL,
      "anaestheticNotes" text NOT NULL DEFAULT (''),
      "adverseEvents" text NOT NULL DEFAULT ('[]'),
      "adverseEventNotes" text NOT NULL DEFAULT (''),
      "notes" text NOT NULL DEFAULT (''),
      "createdAt" varchar(30) NOT NULL,
      "updatedAt" varchar(30) NOT NULL,
      CONSTRAINT "UQ_treatment_visit" UNIQUE ("visitId"),
      CONSTRAINT "FK_treatment_visit" FOREIGN KEY ("visitId") REFERENCES "visit" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_treatment_patient" FOREIGN KEY ("patientId") REFERENCES "patient" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_treatment_practitioner" FOREIGN KEY ("practitionerId") REFERENCES "user" ("id"))`);
    await q.query(`CREATE INDEX "IDX_treatment_patient_at" ON "treatment" ("patientId", "treatedAt")`);

    await q.query(`CREATE TABLE "treatment_line" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "treatmentId" varchar(36) NOT NULL,
      "position" integer NOT NULL,
      "productId" varchar(36) NOT NULL,
      "productName" varchar(120) NOT NULL,
      "manufacturer" varchar(120) NOT NULL,
      "kind" varchar(10) NOT NULL,
      "unit" varchar(4) NOT NULL,
      "lotNumber" varchar(40),
      "expiryDate" varchar(10),
      "techniques" text NOT NULL DEFAULT ('[]'),
      "device" varchar(10),
      "gauge" integer,
      "depth" varchar(20),
      "notes" text NOT NULL DEFAULT (''),
      CONSTRAINT "CHK_line_kind_unit" CHECK (("kind" = 'filler' AND "unit" = 'mL') OR ("kind" = 'toxin' AND "unit" = 'U')),
      CONSTRAINT "FK_line_treatment" FOREIGN KEY ("treatmentId") REFERENCES "treatment" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_line_product" FOREIGN KEY ("productId") REFERENCES "product" ("id"))`);
    await q.query(`CREATE INDEX "IDX_line_treatment" ON "treatment_line" ("treatmentId", "position")`);
    await q.query(`CREATE INDEX "IDX_line_lot" ON "treatment_line" ("productId", "lotNumber")`);

    await q.query(`CREATE TABLE "treatment_dose" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "lineId" varchar(36) NOT NULL,
      "zone" varchar(40) NOT NULL,
      "amountMilli" integer NOT NULL,
      CONSTRAINT "CHK_dose_positive" CHECK ("amountMilli" > 0),
      CONSTRAINT "FK_dose_line" FOREIGN KEY ("lineId") REFERENCES "treatment_line" ("id") ON DELETE CASCADE)`);
    await q.query(`CREATE UNIQUE INDEX "UQ_dose_line_zone" ON "treatment_dose" ("lineId", "zone")`);

    await q.query(`CREATE TABLE "reminder" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "patientId" varchar(36) NOT NULL,
      "visitId" varchar(36) NOT NULL,
      "treatmentId" varchar(36) NOT NULL,
      "kind" varchar(12) NOT NULL,
      "dueOn" varchar(10) NOT NULL,
      "dueAt" varchar(30) NOT NULL,
      "state" varchar(10) NOT NULL DEFAULT ('scheduled'),
      "sentAt" varchar(30),
      "mailId" varchar(36),
      "cancelledAt" varchar(30),
      "cancelledById" varchar(36),
      "cancelReason" varchar(300),
      "createdAt" varchar(30) NOT NULL,
      CONSTRAINT "CHK_reminder_state" CHECK ("state" IN ('scheduled', 'sent', 'cancelled')),
      CONSTRAINT "CHK_reminder_sent" CHECK ("state" <> 'sent' OR ("sentAt" IS NOT NULL AND "mailId" IS NOT NULL)),
      CONSTRAINT "FK_reminder_patient" FOREIGN KEY ("patientId") REFERENCES "patient" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_reminder_visit" FOREIGN KEY ("visitId") REFERENCES "visit" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_reminder_treatment" FOREIGN KEY ("treatmentId") REFERENCES "treatment" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_reminder_mail" FOREIGN KEY ("mailId") REFERENCES "mail_log" ("id"))`);
    await q.query(`CREATE INDEX "IDX_reminder_state_due" ON "reminder" ("state", "dueAt")`);
    await q.query(`CREATE INDEX "IDX_reminder_patient_due" ON "reminder" ("patientId", "dueAt")`);
    await q.query(`CREATE UNIQUE INDEX "UQ_reminder_treatment_kind" ON "reminder" ("treatmentId", "kind")`);
    // Once handed to the outbox a reminder is history: it cannot go back to scheduled or be cancelled.
    await q.query(`CREATE TRIGGER "reminder_sent_is_final" BEFORE UPDATE ON "reminder"
      WHEN OLD."state" = 'sent'
      BEGIN SELECT RAISE(ABORT, 'a sent reminder cannot change'); END`);

    await q.query(`CREATE TABLE "reference_picture" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "patientId" varchar(36) NOT NULL,
      "visitId" varchar(36),
      "caption" varchar(300) NOT NULL,
      "key" varchar(300) NOT NULL,
      "thumbKey" varchar(300) NOT NULL,
      "width" integer NOT NULL,
      "height" integer NOT NULL,
      "sha256" varchar(64) NOT NULL,
      "uploadedById" varchar(36) NOT NULL,
      "uploadedAt" varchar(30) NOT NULL,
      "removedAt" varchar(30),
      CONSTRAINT "FK_reference_patient" FOREIGN KEY ("patientId") REFERENCES "patient" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_reference_visit" FOREIGN KEY ("visitId") REFERENCES "visit" ("id") ON DELETE SET NULL,
      CONSTRAINT "FK_reference_user" FOREIGN KEY ("uploadedById") REFERENCES "user" ("id"))`);
    await q.query(`CREATE INDEX "IDX_reference_patient" ON "reference_picture" ("patientId", "uploadedAt")`);
  }

  async down(q: QueryRunner): Promise<void> {
    for (const table of ['reference_picture', 'reminder', 'treatment_dose', 'treatment_line', 'treatment', 'consultation', 'product']) {
      await q.query(`DROP TABLE "${table}"`);
    }
  }
}
