import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Patient search that stays flat as the list grows: a trigram full-text index over names and clinic codes (SQLite
 * FTS5, any 3+ characters of a name, accents ignored), case-insensitive name indexes for shorter prefixes, an index
 * for the date of birth, and a counter per code prefix so a new patient's code needs no scan.
 *
 * The FTS table is contentless (it keeps only the index) and keyed by `patient_search_key`, whose INTEGER PRIMARY
 * KEY never changes (a plain table's rowid may change on VACUUM). Triggers keep both in step with `patient`.
 */
export class PatientSearch1766020000000 implements MigrationInterface {
  name = 'PatientSearch1766020000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE INDEX "IDX_patient_dob" ON "patient" ("dateOfBirth")`);
    await q.query(`CREATE INDEX "IDX_patient_last_nocase" ON "patient" ("lastName" COLLATE NOCASE, "firstName" COLLATE NOCASE)`);
    await q.query(`CREATE INDEX "IDX_patient_first_nocase" ON "patient" ("firstName" COLLATE NOCASE)`);

    await q.query(`CREATE TABLE "patient_search_key" (
      "id" INTEGER PRIMARY KEY,
      "patientId" varchar(36) NOT NULL,
      CONSTRAINT "UQ_patient_search_key" UNIQUE ("patientId"))`);
    await q.query(`CREATE VIRTUAL TABLE "patient_search" USING fts5("name", "code", content='', contentless_delete=1, tokenize='trigram remove_diacritics 1')`);
    await q.query(`INSERT INTO "patient_search_key" ("patientId") SELECT "id" FROM "patient"`);
    await q.query(`INSERT INTO "patient_search" ("rowid", "name", "code")
      SELECT k."id", p."firstName" || ' ' || p."lastName", p."code" FROM "patient" p JOIN "patient_search_key" k ON k."patientId" = p."id"`);
    await q.query(`CREATE TRIGGER "patient_search_insert" AFTER INSERT ON "patient" BEGIN
      INSERT INTO "patient_search_key" ("patientId") VALUES (NEW."id");
      INSERT INTO "patient_search" ("rowid", "name", "code")
        VALUES ((SELECT "id" FROM "patient_search_key" WHERE "patientId" = NEW."id"), NEW."firstName" || ' ' || NEW."lastName", NEW."code");
    END`);
    await q.query(`CREATE TRIGGER "patient_search_update" AFTER UPDATE OF "firstName", "lastName", "code" ON "patient" BEGIN
      UPDATE "patient_search" SET "name" = NEW."firstName" || ' ' || NEW."lastName", "code" = NEW."code"
        WHERE "rowid" = (SELECT "id" FROM "patient_search_key" WHERE "patientId" = NEW."id");
    END`);
    await q.query(`CREATE TRIGGER "patient_search_delete" AFTER DELETE ON "patient" BEGIN
      DELETE FROM "patient_search" WHERE "rowid" = (SELECT "id" FROM "patient_search_key" WHERE "patientId" = OLD."id");
      DELETE FROM "patient_search_key" WHERE "patientId" = OLD."id";
    END`);

    // The highest number given so far per code prefix ("LR" for LR-0042). Codes written by any path (the demo seed,
    // an import) raise it through the trigger, so the next code never collides.
    await q.query(`CREATE TABLE "patient_code_counter" (
      "prefix" varchar(12) PRIMARY KEY NOT NULL,
      "last" integer NOT NULL)`);
    await q.query(`INSERT INTO "patient_code_counter" ("prefix", "last")
      SELECT substr("code", 1, instr("code", '-') - 1), max(CAST(substr("code", instr("code", '-') + 1) AS INTEGER))
      FROM "patient" WHERE instr("code", '-') > 1 GROUP BY 1`);
    await q.query(`CREATE TRIGGER "patient_code_counter_raise" AFTER INSERT ON "patient" WHEN instr(NEW."code", '-') > 1 BEGIN
      INSERT INTO "patient_code_counter" ("prefix", "last")
        VALUES (substr(NEW."code", 1, instr(NEW."code", '-') - 1), CAST(substr(NEW."code", instr(NEW."code", '-') + 1) AS INTEGER))
        ON CONFLICT ("prefix") DO UPDATE SET "last" = max("last", excluded."last");
    END`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TRIGGER "patient_code_counter_raise"`);
    await q.query(`DROP TABLE "patient_code_counter"`);
    for (const t of ['patient_search_delete', 'patient_search_update', 'patient_search_insert']) await q.query(`DROP TRIGGER "${t}"`);
    await q.query(`DROP TABLE "patient_search"`);
    await q.query(`DROP TABLE "patient_search_key"`);
    for (const i of ['IDX_patient_first_nocase', 'IDX_patient_last_nocase', 'IDX_patient_dob']) await q.query(`DROP INDEX "${i}"`);
  }
}
