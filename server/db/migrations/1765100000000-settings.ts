import type { MigrationInterface, QueryRunner } from 'typeorm';

export class Settings1765100000000 implements MigrationInterface {
  name = 'Settings1765100000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE "clinic_settings" (
      "id" varchar(16) PRIMARY KEY NOT NULL,
      "clinicName" varchar(120) NOT NULL,
      "timeZone" varchar(64) NOT NULL,
      "idleMinutes" integer NOT NULL,
      "reviewReminderDays" integer NOT NULL,
      "maintenanceReminderMonths" integer NOT NULL,
      "retentionYears" integer NOT NULL,
      "watermarkText" varchar(80) NOT NULL,
      "showcaseCaption" varchar(120) NOT NULL,
      "updatedAt" varchar(30) NOT NULL,
      "updatedById" varchar(36),
      CONSTRAINT "CHK_settings_single_row" CHECK ("id" = 'clinic'))`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE "clinic_settings"`);
  }
}
