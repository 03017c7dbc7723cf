import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Landmarks, alignment, pose, capture quality and lip measurements on each photo, and each patient's target lip
 * ratio. New photos start as "aligning" so the alignment worker finds them again after a restart.
 */
export class Landmarks1764800000000 implements MigrationInterface {
  name = 'Landmarks1764800000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE "photo" ADD COLUMN "alignmentState" varchar(16) NOT NULL DEFAULT ('aligning')`);
    await q.query(`ALTER TABLE "photo" ADD COLUMN "alignmentNote" text`);
    await q.query(`ALTER TABLE "photo" ADD COLUMN "alignmentAttempts" integer NOT NULL DEFAULT (0)`);
    await q.query(`ALTER TABLE "photo" ADD COLUMN "landmarks" text`);
    await q.query(`ALTER TABLE "photo" ADD COLUMN "landmarksRev" integer NOT NULL DEFAULT (0)`);
    await q.query(`ALTER TABLE "photo" ADD COLUMN "alignment" text`);
    await q.query(`ALTER TABLE "photo" ADD COLUMN "pose" text`);
    await q.query(`ALTER TABLE "photo" ADD COLUMN "quality" text`);
    await q.query(`ALTER TABLE "photo" ADD COLUMN "measurements" text`);
    await q.query(`CREATE INDEX "IDX_photo_alignment_state" ON "photo" ("alignmentState")`);
    await q.query(`ALTER TABLE "patient" ADD COLUMN "lipRatioTarget" real`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE "patient" DROP COLUMN "lipRatioTarget"`);
    await q.query(`DROP INDEX "IDX_photo_alignment_state"`);
    for (const c of ['measurements', 'quality', 'pose', 'alignment', 'landmarksRev', 'landmarks', 'alignmentAttempts', 'alignmentNote', 'alignmentState']) {
      await q.query(`ALTER TABLE "photo" DROP COLUMN "${c}"`);
    }
  }
}
