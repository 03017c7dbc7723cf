import { Column, Entity, PrimaryColumn } from 'typeorm';

@Entity('patient')
export class Patient {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  /** Short code used at the front desk, e.g. "LR-0042". */
  @Column('varchar', { length: 16, unique: true })
  code: string;

  @Column('varchar', { length: 80 })
  firstName: string;

  @Column('varchar', { length: 80 })
  lastName: string;

  /** ISO date (YYYY-MM-DD). */
  @Column('varchar', { length: 10 })
  dateOfBirth: string;

  @Column('varchar', { length: 254, nullable: true })
  email: string | null;

  @Column('varchar', { length: 40, nullable: true })
  phone: string | null;

  @Column('boolean', { default: false })
  archived: boolean;

  /**
   * Target upper:lower lip ratio as x in 1:x (1, 1.6, 2 or custom); null when none is chosen. A guide, not a treatment
   * target. Not selected by default: the patient record is also shown to the front desk, which sees no clinical detail.
   */
  @Column('real', { nullable: true, select: false })
  lipRatioTarget: number | null;

  @Column('varchar', { length: 30 })
  createdAt: string;

  @Column('varchar', { length: 30 })
  updatedAt: string;
}
