import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Stock: lots on the shelf per product, counted in packs, and the append-only ledger of their movements. */
export class Stock1766014000001 implements MigrationInterface {
  name = 'Stock1766014000001';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE "stock_lot" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "productId" varchar(36) NOT NULL,
      "lotNumber" varchar(40) NOT NULL,
      "expiryDate" varchar(10) NOT NULL,
      "onHand" integer NOT NULL,
      "receivedAt" varchar(30) NOT NULL,
      "receivedById" varchar(36) NOT NULL,
      "notes" text NOT NULL DEFAULT (''),
      CONSTRAINT "CHK_stock_lot_on_hand" CHECK ("onHand" >= 0),
      CONSTRAINT "UQ_stock_lot_product_lot" UNIQUE ("productId", "lotNumber"),
      CONSTRAINT "FK_stock_lot_product" FOREIGN KEY ("productId") REFERENCES "product" ("id"),
      CONSTRAINT "FK_stock_lot_user" FOREIGN KEY ("receivedById") REFERENCES "user" ("id"))`);
    await q.query(`CREATE INDEX "IDX_stock_lot_expiry" ON "stock_lot" ("expiryDate")`);

    await q.query(`CREATE TABLE "stock_movement" (
      "id" varchar(36) PRIMARY KEY NOT NULL,
      "lotId" varchar(36) NOT NULL,
      "delta" integer NOT NULL,
      "reason" varchar(12) NOT NULL,
      "treatmentId" varchar(36),
      "episodeId" varchar(36),
      "note" text NOT NULL DEFAULT (''),
      "at" varchar(30) NOT NULL,
      "byId" varchar(36),
      CONSTRAINT "CHK_stock_movement_delta" CHECK ("delta" <> 0),
      CONSTRAINT "CHK_stock_movement_reason" CHECK ("reason" IN ('received', 'used', 'returned', 'discarded', 'counted')),
      CONSTRAINT "FK_stock_movement_lot" FOREIGN KEY ("lotId") REFERENCES "stock_lot" ("id"))`);
    await q.query(`CREATE INDEX "IDX_stock_movement_lot_at" ON "stock_movement" ("lotId", "at")`);
    await q.query(`CREATE INDEX "IDX_stock_movement_treatment" ON "stock_movement" ("treatmentId")`);
    await q.query(`CREATE TRIGGER "stock_movement_no_update" BEFORE UPDATE ON "stock_movement"
      BEGIN SELECT RAISE(ABORT, 'stock_movement is append-only'); END`);
    await q.query(`CREATE TRIGGER "stock_movement_no_delete" BEFORE DELETE ON "stock_movement"
      BEGIN SELECT RAISE(ABORT, 'stock_movement is append-only'); END`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE "stock_movement"`);
    await q.query(`DROP TABLE "stock_lot"`);
  }
}
