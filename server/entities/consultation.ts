import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

/** A stage of a treatment plan, e.g. "1 mL today", "review and top-up if needed". */
export interface PlanStage {
  label: string;
  plannedDate: string | null;
  plannedAmountMl: number | null;
}

/** The patient's goals, the chosen lip ratio and the staged plan, recorded at a visit. */
@Entity('consultation')
@Index(['patientId', 'createdAt'])
export class Consultation {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36, unique: true })
  visitId: string;

  @Column('varchar', { length: 36 })
  patientId: string;

  /** JSON array of goal keys. */
  @Column('text', { default: '[]' })
  goals: string;

  @Column('text', { default: '' })
  goalsText: string;

  /** '1:1', '1:1.6', '1:2' or 'custom' (upper : lower vermilion height). */
  @Column('varchar', { length: 8, nullable: true })
  targetRatio: string | null;

  /** Lower per upper for a custom target. */
  @Column('real', { nullable: true })
  customRatio: number | null;

  @Column('text', { default: '' })
  expectations: string;

  /** JSON array of `PlanStage`. */
  @Column('text', { default: '[]' })
  plan: string;

  @Column('varchar', { length: 36 })
  recordedById: string;

  @Column('varchar', { length: 30 })
  createdAt: string;

  @Column('varchar', { length: 30 })
  updatedAt: string;
}
