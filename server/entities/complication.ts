import { Column, Entity, Index, JoinColumn, ManyToOne, OneToMany, PrimaryColumn, type Relation } from 'typeorm';
import type { ActionKind, Outcome } from '../features/complications/complications.schemas.js';
import { Patient } from './patient.js';
import { Treatment } from './treatment.js';
import { User } from './user.js';

/** A complication after a treatment: onset, signs, what was done and when, follow-ups and the outcome. */
@Entity('complication_episode')
@Index(['patientId', 'startedAt'])
export class ComplicationEpisode {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  patientId: string;

  @ManyToOne(() => Patient, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'patientId' })
  patient?: Relation<Patient>;

  @Column('varchar', { length: 36 })
  treatmentId: string;

  @ManyToOne(() => Treatment, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'treatmentId' })
  treatment?: Relation<Treatment>;

  /** The treatment's visit: its photos are the baseline the episode's photos are compared with. */
  @Column('varchar', { length: 36 })
  visitId: string;

  @Column('varchar', { length: 30 })
  startedAt: string;

  @Column('varchar', { length: 36 })
  startedById: string;

  @ManyToOne(() => User)
  @JoinColumn({ name: 'startedById' })
  startedBy?: Relation<User>;

  @Column('varchar', { length: 30 })
  onsetAt: string;

  /** JSON array of sign keys. */
  @Column('text', { default: '[]' })
  signs: string;

  @Column('text', { default: '' })
  signsNotes: string;

  @Column('varchar', { length: 24, nullable: true })
  outcome: Outcome | null;

  @Column('text', { default: '' })
  outcomeNotes: string;

  @Column('varchar', { length: 30, nullable: true })
  outcomeAt: string | null;

  @Column('varchar', { length: 30 })
  updatedAt: string;

  @OneToMany(() => ComplicationAction, (a) => a.episode)
  actions?: Relation<ComplicationAction>[];

  @OneToMany(() => ComplicationFollowUp, (f) => f.episode)
  followUps?: Relation<ComplicationFollowUp>[];
}

/** One thing done, with its time. Never changed after it is written (a database trigger): a correction is a new entry. */
@Entity('complication_action')
@Index(['episodeId', 'at'])
export class ComplicationAction {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  episodeId: string;

  @ManyToOne(() => ComplicationEpisode, (e) => e.actions, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'episodeId' })
  episode?: Relation<ComplicationEpisode>;

  @Column('varchar', { length: 30 })
  at: string;

  @Column('varchar', { length: 16 })
  kind: ActionKind;

  @Column('text', { default: '' })
  description: string;

  @Column('varchar', { length: 36, nullable: true })
  productId: string | null;

  /** Copied from the catalogue at the time, like treatment lines. */
  @Column('varchar', { length: 120, nullable: true })
  productName: string | null;

  @Column('varchar', { length: 40, nullable: true })
  unitLabel: string | null;

  @Column('varchar', { length: 40, nullable: true })
  lotNumber: string | null;

  @Column('varchar', { length: 10, nullable: true })
  expiryDate: string | null;

  /** Thousandths of the product's unit, as treatment doses. */
  @Column('integer', { nullable: true })
  amountMilli: number | null;

  @Column('varchar', { length: 36, nullable: true })
  stockLotId: string | null;

  @Column('varchar', { length: 36 })
  recordedById: string;

  @ManyToOne(() => User)
  @JoinColumn({ name: 'recordedById' })
  recordedBy?: Relation<User>;

  @Column('varchar', { length: 30 })
  recordedAt: string;
}

/** A follow-up of the episode, usually with a booked visit where the episode's photos are taken. */
@Entity('complication_follow_up')
@Index(['episodeId', 'at'])
export class ComplicationFollowUp {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  episodeId: string;

  @ManyToOne(() => ComplicationEpisode, (e) => e.followUps, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'episodeId' })
  episode?: Relation<ComplicationEpisode>;

  @Column('varchar', { length: 36, nullable: true })
  visitId: string | null;

  @Column('varchar', { length: 30 })
  at: string;

  @Column('text', { default: '' })
  notes: string;

  @Column('varchar', { length: 36 })
  recordedById: string;

  @Column('varchar', { length: 30 })
  recordedAt: string;
}
