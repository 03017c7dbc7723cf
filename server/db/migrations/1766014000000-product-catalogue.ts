import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * The catalogue learns GTINs (for box scanning), each product's own unit label, and hyaluronidase as a third kind.
 * `ALTER TABLE … DROP/ADD CONSTRAINT` is the same SQL on SQLite (3.51 and later, bundled with better-sqlite3) and PostgreSQL.
 */
export class ProductCatalogue1766014000000 implements MigrationInterface {
  name = 'ProductCatalogue1766014000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE "product" ADD COLUMN "gtin" varchar(14)`);
    await q.query(`ALTER TABLE "product" ADD COLUMN "unitLabel" varchar(40)`);
    // "hyaluronidase" is longer than the kind column's 10; SQLite does not enforce varchar lengths, PostgreSQL does.
    if (q.connection.options.type === 'postgres') await q.query(`ALTER TABLE "product" ALTER COLUMN "kind" TYPE varchar(16)`);
    await q.query(`CREATE UNIQUE INDEX "UQ_product_gtin" ON "product" ("gtin") WHERE "gtin" IS NOT NULL`);
    await q.query(`ALTER TABLE "product" DROP CONSTRAINT "CHK_product_kind_unit"`);
    await q.query(`ALTER TABLE "product" ADD CONSTRAINT "CHK_product_kind_unit" CHECK (("kind" = 'filler' AND "unit" = 'mL') OR ("kind" IN ('toxin', 'hyaluronidase') AND "unit" = 'U'))`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE "product" DROP CONSTRAINT "CHK_product_kind_unit"`);
    await q.query(`ALTER TABLE "product" ADD CONSTRAINT "CHK_product_kind_unit" CHECK (("kind" = 'filler' AND "unit" = 'mL') OR ("kind" = 'toxin' AND "unit" = 'U'))`);
    await q.query(`DROP INDEX "UQ_product_gtin"`);
    await q.query(`ALTER TABLE "product" DROP COLUMN "unitLabel"`);
    await q.query(`ALTER TABLE "product" DROP COLUMN "gtin"`);
  }
}
