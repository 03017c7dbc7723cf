import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

export const REMINDER_KINDS = ['review', 'maintenance'] as const;
export type ReminderKind = (typeof REMINDER_KINDS)[number];
export const REMINDER_STATES = ['scheduled', 'sent', 'cancelled'] as const;
export type ReminderState = (typeof REMINDER_STATES)[number];

/**
 * An e-mail to the patient after a treatment: the review at 2–4 weeks, maintenance months later.
 * `scheduled → sent` is taken by one conditional UPDATE in the same transaction that queues the mail,
 * so a reminder is queued once however many schedulers run; `sent` means handed to the outbox.
 */
@Entity('reminder')
@Index(['state', 'dueAt'])
@Index(['patientId', 'dueAt'])
@Index(['treatmentId', 'kind'], { unique: true })
export class Reminder {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  patientId: string;

  @Column('varchar', { length: 36 })
  visitId: string;

  @Column('varchar', { length: 36 })
  treatmentId: string;

  @Column('varchar', { length: 12 })
  kind: ReminderKind;

  /** The day the reminder is for, in the clinic's time zone (YYYY-MM-DD). */
  @Column('varchar', { length: 10 })
  dueOn: string;

  /** UTC instant from which the scheduler sends it (a morning hour of `dueOn` in the clinic's time zone). */
  @Column('varchar', { length: 30 })
  dueAt: string;

  @Column('varchar', { length: 10, default: 'scheduled' })
  state: ReminderState;

  @Column('varchar', { length: 30, nullable: true })
  sentAt: string | null;

  /** The outbox row that carries it. */
  @Column('varchar', { length: 36, nullable: true })
  mailId: string | null;

  @Column('varchar', { length: 30, nullable: true })
  cancelledAt: string | null;

  /** Null when the system cancelled it (e.g. no e-mail address). */
  @Column('varchar', { length: 36, nullable: true })
  cancelledById: string | null;

  @Column('varchar', { length: 300, nullable: true })
  cancelReason: string | null;

  @Column('varchar', { length: 30 })
  createdAt: string;
}
