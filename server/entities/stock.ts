import { Column, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { Product } from './product.js';

export const STOCK_REASONS = ['received', 'used', 'returned', 'discarded', 'counted'] as const;
export type StockReason = (typeof STOCK_REASONS)[number];

/**
 * One lot of one product on the clinic's shelf, counted in packs (syringes, vials). `onHand` is the sum of the lot's
 * movements, kept in the row so a CHECK constraint refuses any change that would take it below zero.
 */
@Entity('stock_lot')
@Index(['productId', 'lotNumber'], { unique: true })
export class StockLot {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  productId: string;

  @ManyToOne(() => Product)
  @JoinColumn({ name: 'productId' })
  product?: Relation<Product>;

  @Column('varchar', { length: 40 })
  lotNumber: string;

  /** YYYY-MM-DD: the last day the lot may be used. */
  @Column('varchar', { length: 10 })
  expiryDate: string;

  @Column('integer')
  onHand: number;

  @Column('varchar', { length: 30 })
  receivedAt: string;

  @Column('varchar', { length: 36 })
  receivedById: string;

  @Column('text', { default: '' })
  notes: string;
}

/** One change to a lot's count. Append-only (database triggers): a correction is a further movement. */
@Entity('stock_movement')
@Index(['lotId', 'at'])
@Index(['treatmentId'])
export class StockMovement {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  lotId: string;

  @ManyToOne(() => StockLot)
  @JoinColumn({ name: 'lotId' })
  lot?: Relation<StockLot>;

  /** Packs in (positive) or out (negative). */
  @Column('integer')
  delta: number;

  @Column('varchar', { length: 12 })
  reason: StockReason;

  /** The treatment that used the packs (a plain reference: the ledger outlives an erased patient's record). */
  @Column('varchar', { length: 36, nullable: true })
  treatmentId: string | null;

  /** The complication episode that used the packs. */
  @Column('varchar', { length: 36, nullable: true })
  episodeId: string | null;

  @Column('text', { default: '' })
  note: string;

  @Column('varchar', { length: 30 })
  at: string;

  @Column('varchar', { length: 36, nullable: true })
  byId: string | null;
}
