import type { MigrationInterface, QueryRunner } from 'typeorm';

const DEFAULT_SHOT_LIST_ID = '2f6b5c1e-8a47-4d8e-9c1b-6a0d3e7f5a10';

/**
 * The built-in "Lips & lower face" list (DESIGN §3). Copied here, not imported, so the migration keeps
 * inserting what it inserted on the day it shipped.
 */
const DEFAULT_VIEWS: [string, string, string, string][] = [
  ['frontal-rest', 'Frontal, at rest', 'face', 'Camera at eye level, square to the face, at the same distance every visit. Head level in natural head position (eyes looking at a point on the horizon), both ears equally visible. Lips lightly closed, teeth apart, no expression. Frame from the hairline to just below the chin.'],
  ['frontal-smile', 'Frontal, smiling', 'face', 'Same camera position and framing as the frontal at rest. A full, natural smile that shows the teeth; keep the head level and do not tilt the chin up.'],
  ['lips-rest', 'Lips close-up, at rest', 'lips', 'Camera at lip height and square to the mouth. Frame from the base of the nose to the chin with both mouth corners well inside the picture. Lips relaxed and just touching, no pressing together.'],
  ['lips-pucker', 'Lips close-up, pucker', 'lips', 'Same framing as the close-up at rest. Lips pushed forward as if to whistle or kiss, jaw still, head level.'],
  ['oblique-left', 'Oblique left 45°', 'face', "Shows the patient's left side. The patient turns the head about 45° to their right until the tip of the nose nearly meets the outline of the far cheek. Head level, lips at rest, same distance as the frontal views."],
  ['oblique-right', 'Oblique right 45°', 'face', "Shows the patient's right side. The patient turns the head about 45° to their left until the tip of the nose nearly meets the outline of the far cheek. Head level, lips at rest, same distance as the frontal views."],
  ['lateral-left', 'Lateral left 90°', 'profile', "The patient's left profile: body and head turned a full 90° so only the left eye shows. Keep the Frankfort horizontal level (top of the ear canal in line with the lowest point of the eye socket). Lips at rest."],
  ['lateral-right', 'Lateral right 90°', 'profile', "The patient's right profile: body and head turned a full 90° so only the right eye shows. Keep the Frankfort horizontal level (top of the ear canal in line with the lowest point of the eye socket). Lips at rest."],
];

export class Photos1764700000000 implements MigrationInterface {
  name = 'Photos1764700000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE "shot_list" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "name" varchar(80) NOT NULL,
      "archived" boolean NOT NULL DEFAULT (0),
      "createdAt" varchar(30) NOT NULL,
      "updatedAt" varchar(30) NOT NULL)`);
    await q.query(`CREATE TABLE "shot_list_view" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "shotListId" varchar(36) NOT NULL,
      "position" integer NOT NULL,
      "key" varchar(40) NOT NULL,
      "label" varchar(60) NOT NULL,
      "hint" text NOT NULL DEFAULT (''),
      "anchorKind" varchar(12) NOT NULL,
      CONSTRAINT "FK_shot_list_view_list" FOREIGN KEY ("shotListId") REFERENCES "shot_list" ("id") ON DELETE CASCADE)`);
    await q.query(`CREATE UNIQUE INDEX "UQ_shot_list_view_key" ON "shot_list_view" ("shotListId", "key")`);

    const now = new Date().toISOString();
    await q.query(`INSERT INTO "shot_list" ("id", "name", "archived", "createdAt", "updatedAt") VALUES (?, ?, 0, ?, ?)`, [
      DEFAULT_SHOT_LIST_ID,
      'Lips & lower face',
      now,
      now,
    ]);
    for (const [i, [key, label, anchorKind, hint]] of DEFAULT_VIEWS.entries()) {
      // Deterministic ids so every installation has the same default views.
      const id = `${DEFAULT_SHOT_LIST_ID.slice(0, 24)}${String(i + 1).padStart(12, '0')}`;
      await q.query(
        `INSERT INTO "shot_list_view" ("id", "shotListId", "position", "key", "label", "hint", "anchorKind") VALUES (?, ?, ?, ?, ?, ?, ?)`,
        [id, DEFAULT_SHOT_LIST_ID, i, key, label, hint, anchorKind],
      );
    }

    // A column default rather than a foreign key: SQLite cannot add a REFERENCES column with a non-null default,
    // and shot lists are never deleted (only archived), so the reference cannot dangle.
    await q.query(`ALTER TABLE "visit" ADD COLUMN "shotListId" varchar(36) NOT NULL DEFAULT ('${DEFAULT_SHOT_LIST_ID}')`);

    await q.query(`CREATE TABLE "photo" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "patientId" varchar(36) NOT NULL,
      "visitId" varchar(36) NOT NULL,
      "viewKey" varchar(40) NOT NULL,
      "state" varchar(12) NOT NULL DEFAULT ('captured'),
      "replacedById" varchar(36),
      "width" integer NOT NULL,
      "height" integer NOT NULL,
      "capturedAt" varchar(30) NOT NULL,
      "captureTimeSource" varchar(10) NOT NULL,
      "sourceOrientation" integer,
      "uploadedAt" varchar(30) NOT NULL,
      "uploadedById" varchar(36) NOT NULL,
      "sha256" varchar(64) NOT NULL,
      "sourceSha256" varchar(64) NOT NULL,
      "sourceBytes" integer NOT NULL,
      "variants" text NOT NULL,
      CONSTRAINT "FK_photo_patient" FOREIGN KEY ("patientId") REFERENCES "patient" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_photo_visit" FOREIGN KEY ("visitId") REFERENCES "visit" ("id") ON DELETE CASCADE,
      CONSTRAINT "FK_photo_uploader" FOREIGN KEY ("uploadedById") REFERENCES "user" ("id"))`);
    await q.query(`CREATE INDEX "IDX_photo_visit_view" ON "photo" ("visitId", "viewKey")`);
    await q.query(`CREATE INDEX "IDX_photo_patient_captured" ON "photo" ("patientId", "capturedAt")`);
    // The same file twice to one view is one photo, even when two uploads race.
    await q.query(`CREATE UNIQUE INDEX "UQ_photo_view_source" ON "photo" ("visitId", "viewKey", "sourceSha256")`);
    // At most one current photo per view; retakes are kept as "replaced".
    await q.query(`CREATE UNIQUE INDEX "UQ_photo_current_view" ON "photo" ("visitId", "viewKey") WHERE "state" = 'captured'`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE "photo"`);
    await q.query(`ALTER TABLE "visit" DROP COLUMN "shotListId"`);
    await q.query(`DROP TABLE "shot_list_view"`);
    await q.query(`DROP TABLE "shot_list"`);
  }
}
