import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

export const MAIL_STATES = ['pending', 'sending', 'sent', 'failed'] as const;
export type MailState = (typeof MAIL_STATES)[number];

/** A file attached to a queued mail: the bytes stay in object storage until the mail is sent. */
export interface MailAttachmentRef {
  key: string;
  filename: string;
  contentType: string;
}

/**
 * One outgoing e-mail (the outbox). Rows are written in the same transaction as the record that
 * causes the mail, and a worker sends them later, so a mail is never lost when SMTP is down.
 * `sending` is a short lease held by one worker (see `claimToken`, `claimedUntil`).
 */
@Entity('mail_log')
@Index(['state', 'nextAttemptAt'])
@Index(['relatedType', 'relatedId'])
export class MailLog {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 254 })
  to: string;

  @Column('varchar', { length: 200 })
  subject: string;

  @Column('text')
  text: string;

  @Column('text', { nullable: true })
  html: string | null;

  /** JSON array of `MailAttachmentRef`. */
  @Column('text', { default: '[]' })
  attachments: string;

  @Column('varchar', { length: 10, default: 'pending' })
  state: MailState;

  @Column('integer', { default: 0 })
  attempts: number;

  @Column('varchar', { length: 30 })
  nextAttemptAt: string;

  @Column('varchar', { length: 36, nullable: true })
  claimToken: string | null;

  @Column('varchar', { length: 30, nullable: true })
  claimedUntil: string | null;

  @Column('varchar', { length: 30, nullable: true })
  sentAt: string | null;

  @Column('varchar', { length: 300, nullable: true })
  messageId: string | null;

  @Column('text', { nullable: true })
  lastError: string | null;

  /** What caused the mail, e.g. ("consent", id) or ("consent-withdrawal", id). */
  @Column('varchar', { length: 40, nullable: true })
  relatedType: string | null;

  @Column('varchar', { length: 36, nullable: true })
  relatedId: string | null;

  @Column('varchar', { length: 36, nullable: true })
  patientId: string | null;

  @Column('varchar', { length: 30 })
  createdAt: string;
}
