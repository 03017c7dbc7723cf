import { Column, Entity, Index, JoinColumn, ManyToOne, OneToMany, PrimaryColumn, type Relation } from 'typeorm';
import type { LineKind, ProductUnit, ZoneKey } from '../features/treatments/treatments.schemas.js';
import { Patient } from './patient.js';
import { User } from './user.js';
import { Visit } from './visit.js';

/**
 * What was injected at one visit: one or more product lines, each with its lot and the amount per zone.
 * One treatment per visit; a correction replaces the lines and is written to the access log.
 */
@Entity('treatment')
@Index(['patientId', 'treatedAt'])
export class Treatment {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36, unique: true })
  visitId: string;

  @ManyToOne(() => Visit, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'visitId' })
  visit?: Relation<Visit>;

  @Column('varchar', { length: 36 })
  patientId: string;

  @ManyToOne(() => Patient, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'patientId' })
  patient?: Relation<Patient>;

  /** The injector who recorded it. */
  @Column('varchar', { length: 36 })
  practitionerId: string;

  @ManyToOne(() => User)
  @JoinColumn({ name: 'practitionerId' })
  practitioner?: Relation<User>;

  /** UTC ISO time of the treatment. */
  @Column('varchar', { length: 30 })
  treatedAt: string;

  /** The treatment's calendar day in the clinic's time zone (YYYY-MM-DD): lots are checked against it. */
  @Column('varchar', { length: 10 })
  treatedOn: string;

  @Column('varchar', { length: 24 })
  anaesthetic: string;

  @Column('text', { default: '' })
  anaestheticNotes: string;

  /** JSON array of adverse-event keys. */
  @Column('text', { default: '[]' })
  adverseEvents: string;

  @Column('text', { default: '' })
  adverseEventNotes: string;

  @Column('text', { default: '' })
  notes: string;

  @OneToMany(() => TreatmentLine, (l) => l.treatment)
  lines?: Relation<TreatmentLine>[];

  @Column('varchar', { length: 30 })
  createdAt: string;

  @Column('varchar', { length: 30 })
  updatedAt: string;
}

/** One product used in a treatment. Name, maker, kind and unit are copied from the catalogue at the time. */
@Entity('treatment_line')
@Index(['treatmentId', 'position'])
export class TreatmentLine {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  treatmentId: string;

  @ManyToOne(() => Treatment, (t) => t.lines, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'treatmentId' })
  treatment?: Relation<Treatment>;

  @Column('integer')
  position: number;

  @Column('varchar', { length: 36 })
  productId: string;

  @Column('varchar', { length: 120 })
  productName: string;

  @Column('varchar', { length: 120 })
  manufacturer: string;

  @Column('varchar', { length: 10 })
  kind: LineKind;

  @Column('varchar', { length: 4 })
  unit: ProductUnit;

  /** Null until read from the box: shown as an open item of the visit. */
  @Column('varchar', { length: 40, nullable: true })
  lotNumber: string | null;

  /** YYYY-MM-DD; the lot may be used up to and including this day. */
  @Column('varchar', { length: 10, nullable: true })
  expiryDate: string | null;

  /** JSON array of technique keys. */
  @Column('text', { default: '[]' })
  techniques: string;

  @Column('varchar', { length: 10, nullable: true })
  device: string | null;

  @Column('integer', { nullable: true })
  gauge: number | null;

  @Column('varchar', { length: 20, nullable: true })
  depth: string | null;

  @Column('text', { default: '' })
  notes: string;

  @OneToMany(() => TreatmentDose, (d) => d.line)
  doses?: Relation<TreatmentDose>[];
}

/** The amount of one line's product put into one zone of the lip diagram. */
@Entity('treatment_dose')
@Index(['lineId', 'zone'], { unique: true })
export class TreatmentDose {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  lineId: string;

  @ManyToOne(() => TreatmentLine, (l) => l.doses, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'lineId' })
  line?: Relation<TreatmentLine>;

  @Column('varchar', { length: 40 })
  zone: ZoneKey;

  /** Thousandths of the line's unit (µL for fillers, milli-units for toxin), so sums are exact. */
  @Column('integer')
  amountMilli: number;
}
