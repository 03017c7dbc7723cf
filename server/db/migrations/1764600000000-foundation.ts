import type { MigrationInterface, QueryRunner } from 'typeorm';

export class Foundation1764600000000 implements MigrationInterface {
  name = 'Foundation1764600000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE "user" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "email" varchar(254) NOT NULL,
      "name" varchar(120) NOT NULL,
      "role" varchar(20) NOT NULL,
      "passwordHash" varchar(255) NOT NULL,
      "active" boolean NOT NULL DEFAULT (1),
      "createdAt" varchar(30) NOT NULL,
      "updatedAt" varchar(30) NOT NULL,
      CONSTRAINT "UQ_user_email" UNIQUE ("email"))`);
    await q.query(`CREATE TABLE "patient" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "code" varchar(16) NOT NULL,
      "firstName" varchar(80) NOT NULL,
      "lastName" varchar(80) NOT NULL,
      "dateOfBirth" varchar(10) NOT NULL,
      "email" varchar(254),
      "phone" varchar(40),
      "archived" boolean NOT NULL DEFAULT (0),
      "createdAt" varchar(30) NOT NULL,
      "updatedAt" varchar(30) NOT NULL,
      CONSTRAINT "UQ_patient_code" UNIQUE ("code"))`);
    await q.query(`CREATE INDEX "IDX_patient_name" ON "patient" ("lastName", "firstName")`);
    await q.query(`CREATE TABLE "visit" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "patientId" varchar(36) NOT NULL,
      "practitionerId" varchar(36) NOT NULL,
      "startsAt" varchar(30) NOT NULL,
      "kind" varchar(20) NOT NULL,
      "status" varchar(20) NOT NULL DEFAULT ('booked'),
      "notes" text NOT NULL DEFAULT (''),
      "createdAt" varchar(30) NOT NULL,
      "updatedAt" varchar(30) NOT NULL,
      CONSTRAINT "FK_visit_patient" FOREIGN KEY ("patientId") REFERENCES "patient" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_visit_practitioner" FOREIGN KEY ("practitionerId") REFERENCES "user" ("id"))`);
    await q.query(`CREATE INDEX "IDX_visit_patient_starts" ON "visit" ("patientId", "startsAt")`);
    await q.query(`CREATE INDEX "IDX_visit_starts" ON "visit" ("startsAt")`);
    await q.query(`CREATE TABLE "audit_event" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "at" varchar(30) NOT NULL,
      "actorId" varchar(36),
      "actorRole" varchar(20) NOT NULL,
      "action" varchar(60) NOT NULL,
      "patientId" varchar(36),
      "targetType" varchar(40),
      "targetId" varchar(64),
      "ip" varchar(64),
      "userAgent" varchar(300),
      "details" text NOT NULL DEFAULT ('{}'))`);
    await q.query(`CREATE INDEX "IDX_audit_at" ON "audit_event" ("at")`);
    await q.query(`CREATE INDEX "IDX_audit_patient_at" ON "audit_event" ("patientId", "at")`);
    await q.query(`CREATE INDEX "IDX_audit_actor_at" ON "audit_event" ("actorId", "at")`);
    // The access log is append-only: the database itself refuses edits and deletions.
    await q.query(`CREATE TRIGGER "audit_event_no_update" BEFORE UPDATE ON "audit_event"
      BEGIN SELECT RAISE(ABORT, 'audit_event is append-only'); END`);
    await q.query(`CREATE TRIGGER "audit_event_no_delete" BEFORE DELETE ON "audit_event"
      BEGIN SELECT RAISE(ABORT, 'audit_event is append-only'); END`);
    await q.query(`CREATE TABLE "session" (
      "expiredAt" bigint NOT NULL,
      "id" varchar(255) PRIMARY KEY NOT NULL,
      "json" text NOT NULL,
      "destroyedAt" datetime)`);
    await q.query(`CREATE INDEX "IDX_session_expired" ON "session" ("expiredAt")`);
    await q.query(`CREATE TABLE "login_failure" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "email" varchar(254) NOT NULL,
      "ip" varchar(64) NOT NULL,
      "at" varchar(30) NOT NULL)`);
    await q.query(`CREATE INDEX "IDX_login_failure_email" ON "login_failure" ("email", "at")`);
    await q.query(`CREATE INDEX "IDX_login_failure_ip" ON "login_failure" ("ip", "at")`);
  }

  async down(q: QueryRunner): Promise<void> {
    for (const table of ['login_failure', 'session', 'audit_event', 'visit', 'patient', 'user']) {
      await q.query(`DROP TABLE "${table}"`);
    }
  }
}
