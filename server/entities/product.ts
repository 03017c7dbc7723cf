import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { ProductKind, ProductUnit } from '../features/treatments/treatments.schemas.js';

/** One product of the clinic's catalogue. Treatment lines copy its name and maker, so renaming never rewrites history. */
@Entity('product')
export class Product {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 120 })
  name: string;

  @Column('varchar', { length: 10 })
  kind: ProductKind;

  /** mL for fillers, U for toxin (a CHECK constraint keeps the pair). */
  @Column('varchar', { length: 4 })
  unit: ProductUnit;

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
