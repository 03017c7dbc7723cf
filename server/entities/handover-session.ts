import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

export const HANDOVER_MODES = ['this-device', 'second-device'] as const;
export type HandoverMode = (typeof HANDOVER_MODES)[number];

/** Progress of one form inside a hand-over. */
export interface HandoverFormProgress {
  shownAt?: string;
  signedAt?: string;
  consentId?: string;
  declinedAt?: string;
}

/**
 * A hand-over: staff give one patient a device showing only chosen forms. On a second device it is
 * joined once with a one-time link (long token) or a short code; only hashes of both are stored.
 */
@Entity('handover_session')
@Index(['codeHash'])
@Index(['patientId'])
export class HandoverSession {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 64, unique: true })
  tokenHash: string;

  @Column('varchar', { length: 64, nullable: true })
  codeHash: string | null;

  @Column('varchar', { length: 20 })
  mode: HandoverMode;

  @Column('varchar', { length: 36 })
  patientId: string;

  @Column('varchar', { length: 36, nullable: true })
  visitId: string | null;

  /** JSON array of template ids (exact versions), in the order they are shown. */
  @Column('text')
  templateIds: string;

  /** JSON object templateId → `HandoverFormProgress`. */
  @Column('text', { default: '{}' })
  progress: string;

  @Column('varchar', { length: 30 })
  expiresAt: string;

  @Column('varchar', { length: 36 })
  createdById: string;

  @Column('varchar', { length: 30 })
  createdAt: string;

  @Column('varchar', { length: 64, nullable: true })
  createdIp: string | null;

  @Column('varchar', { length: 300, nullable: true })
  createdUserAgent: string | null;

  /** When a device was bound to the hand-over (at once for "this device"). A hand-over binds once. */
  @Column('varchar', { length: 30, nullable: true })
  claimedAt: string | null;

  @Column('varchar', { length: 64, nullable: true })
  claimedIp: string | null;

  @Column('varchar', { length: 300, nullable: true })
  claimedUserAgent: string | null;

  @Column('varchar', { length: 30, nullable: true })
  completedAt: string | null;

  @Column('varchar', { length: 30, nullable: true })
  cancelledAt: string | null;
}
