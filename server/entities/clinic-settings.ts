import { Column, Entity, PrimaryColumn } from 'typeorm';

/** The clinic's own settings: a single row (id "clinic"), edited by admins. */
@Entity('clinic_settings')
export class ClinicSettings {
  @PrimaryColumn('varchar', { length: 16 })
  id: string;

  @Column('varchar', { length: 120 })
  clinicName: string;

  /** IANA time zone, e.g. "Europe/London". */
  @Column('varchar', { length: 64 })
  timeZone: string;

  @Column('integer')
  idleMinutes: number;

  /** Absolute session lifetime in hours: a sign-in ends after this however active it is (OWASP ASVS 3.3.2). */
  @Column('integer', { default: 12 })
  sessionHours: number;

  @Column('integer')
  reviewReminderDays: number;

  @Column('integer')
  maintenanceReminderMonths: number;

  /** Clinical records are kept at least this many years after the last visit before erasure is allowed. */
  @Column('integer')
  retentionYears: number;

  @Column('varchar', { length: 80 })
  watermarkText: string;

  @Column('varchar', { length: 120 })
  showcaseCaption: string;

  /** Where the clinic's complication protocol is and who to call: shown on the treatment screen and in episodes. */
  @Column('varchar', { length: 500, default: '' })
  complicationProtocol: string;

  /** A neuromodulator line given by an injector who is not a prescriber needs the prescriber's record. */
  @Column('boolean', { default: false })
  prescriberRequired: boolean;

  /** E-mail the patient a treatment card (product, lot, date) after each treatment. */
  @Column('boolean', { default: false })
  treatmentCardEmail: boolean;

  /** Months from a neuromodulator-only treatment to its maintenance reminder (effect lasts about 3–4 months). */
  @Column('integer', { default: 3 })
  toxinMaintenanceMonths: number;

  @Column('varchar', { length: 30 })
  updatedAt: string;

  @Column('varchar', { length: 36, nullable: true })
  updatedById: string | null;
}
