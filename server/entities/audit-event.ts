import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

/** One line of the access log. Append-only: database triggers refuse UPDATE and DELETE. */
@Entity('audit_event')
@Index(['at', 'id'])
@Index(['action', 'at'])
@Index(['patientId', 'at'])
@Index(['actorId', 'at'])
export class AuditEvent {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 30 })
  at: string;

  @Column('varchar', { length: 36, nullable: true })
  actorId: string | null;

  /** Role at the time (admin, practitioner, coordinator, handover, anonymous). */
  @Column('varchar', { length: 20 })
  actorRole: string;

  /** Dotted action name, e.g. "auth.login", "patient.view". */
  @Column('varchar', { length: 60 })
  action: string;

  @Column('varchar', { length: 36, nullable: true })
  patientId: string | null;

  @Column('varchar', { length: 40, nullable: true })
  targetType: string | null;

  @Column('varchar', { length: 64, nullable: true })
  targetId: string | null;

  @Column('varchar', { length: 64, nullable: true })
  ip: string | null;

  @Column('varchar', { length: 300, nullable: true })
  userAgent: string | null;

  /** Small JSON object with non-sensitive details. */
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
