import { Column, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { Patient } from './patient.js';
import { DEFAULT_SHOT_LIST_ID } from './shot-list.js';
import { User } from './user.js';

export const VISIT_KINDS = ['consultation', 'treatment', 'review', 'follow-up'] as const;
export type VisitKind = (typeof VISIT_KINDS)[number];
export const VISIT_STATUSES = ['booked', 'in-progress', 'completed', 'cancelled'] as const;
export type VisitStatus = (typeof VISIT_STATUSES)[number];

@Entity('visit')
@Index(['patientId', 'startsAt'])
@Index(['startsAt'])
export class Visit {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  patientId: string;

  @ManyToOne(() => Patient, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'patientId' })
  patient?: Relation<Patient>;

  @Column('varchar', { length: 36 })
  practitionerId: string;

  @ManyToOne(() => User)
  @JoinColumn({ name: 'practitionerId' })
  practitioner?: Relation<User>;

  /** UTC ISO timestamp of the appointment start. */
  @Column('varchar', { length: 30 })
  startsAt: string;

  @Column('varchar', { length: 20 })
  kind: VisitKind;

  @Column('varchar', { length: 20, default: 'booked' })
  status: VisitStatus;

  @Column('text', { default: '' })
  notes: string;

  /** The shot list whose views are photographed at this visit. */
  @Column('varchar', { length: 36, default: DEFAULT_SHOT_LIST_ID })
  shotListId: string;

  @Column('varchar', { length: 30 })
  createdAt: string;

  @Column('varchar', { length: 30 })
  updatedAt: string;
}
