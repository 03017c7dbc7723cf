import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

/**
 * The evidence trail of one consent record (who started the hand-over, when the form was shown and
 * signed, from which address and device, withdrawal, flag acknowledgement). Append-only: triggers
 * refuse UPDATE and DELETE.
 */
@Entity('consent_evidence')
@Index(['consentId', 'at'])
export class ConsentEvidence {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  consentId: string;

  @Column('varchar', { length: 30 })
  at: string;

  /** handover.started, handover.claimed, form.shown, form.signed, consent.withdrawn, flags.acknowledged */
  @Column('varchar', { length: 40 })
  event: string;

  @Column('varchar', { length: 36, nullable: true })
  actorId: string | null;

  @Column('varchar', { length: 20 })
  actorRole: string;

  @Column('varchar', { length: 64, nullable: true })
  ip: string | null;

  @Column('varchar', { length: 300, nullable: true })
  userAgent: string | null;

  /** Small JSON object. */
  @Column('text', { default: '{}' })
  details: string;

  /** Place in the tamper-evident chain, with the previous row's chain hash and this row's content hash; set on insert (features/integrity/chain.ts). */
  @Column('integer', { nullable: true })
  chainSeq: number;

  @Column('varchar', { length: 64, nullable: true })
  prevHash: string;

  @Column('varchar', { length: 64, nullable: true })
  rowHash: string;
}
