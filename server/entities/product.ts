import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { ProductKind, ProductUnit } from '../features/treatments/treatments.schemas.js';

/** One product of the clinic's catalogue. Treatment lines copy its name and maker, so renaming never rewrites history. */
@Entity('product')
export class Product {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 120 })
  name: string;

  @Column('varchar', { length: 16 })
  kind: ProductKind;

  /** mL for fillers, U for toxin and hyaluronidase (a CHECK constraint keeps the pair). */
  @Column('varchar', { length: 4 })
  unit: ProductUnit;

  /** The product's own name for its units (units of one product are not another's); null for products in mL. */
  @Column('varchar', { length: 40, nullable: true })
  unitLabel: string | null;

  /** GTIN-14 from the box's GS1 code, so a scan finds the product (check digit verified). */
  @Column('varchar', { length: 14, nullable: true })
  gtin: string | null;

  @Column('varchar', { length: 120 })
  manufacturer: string;

  /** What one pack holds in `unit`, e.g. a 1 mL syringe or a 100 U vial. */
  @Column('real', { nullable: true })
  packSize: number | null;

  @Column('boolean', { default: true })
  active: boolean;

  @Column('varchar', { length: 30 })
  createdAt: string;

  @Column('varchar', { length: 30 })
  updatedAt: string;
}
