import { Column, Entity, Index, PrimaryColumn } from 'typeorm';
import type { ConsentKind } from './consent-template.js';

/**
 * One signed form. Immutable at the database level: triggers refuse DELETE and every UPDATE except
 * setting the withdrawal fields once. Answers and channels are JSON; the signed PDF and the drawn
 * signature live in object storage under the patient's prefix.
 */
@Entity('consent_record')
@Index(['patientId', 'kind', 'signedAt'])
export class ConsentRecord {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  patientId: string;

  @Column('varchar', { length: 36 })
  templateId: string;

  @Column('varchar', { length: 20 })
  kind: ConsentKind;

  @Column('integer')
  templateVersion: number;

  @Column('varchar', { length: 64 })
  templateSha256: string;

  @Column('varchar', { length: 36, nullable: true })
  handoverId: string | null;

  @Column('varchar', { length: 36, nullable: true })
  visitId: string | null;

  /** JSON object questionId → answer. */
  @Column('text', { default: '{}' })
  answers: string;

  /** JSON array of the showcase channels the patient ticked. */
  @Column('text', { default: '[]' })
  channels: string;

  @Column('varchar', { length: 12, nullable: true })
  crop: string | null;

  /** JSON array of question ids whose answer needs a clinician's review. */
  @Column('text', { default: '[]' })
  flaggedQuestionIds: string;

  @Column('varchar', { length: 200 })
  signerName: string;

  /** False when the typed name did not match the patient record (a warning for staff, not a refusal). */
  @Column('boolean')
  nameMatchesPatient: boolean;

  @Column('varchar', { length: 300 })
  signatureKey: string;

  @Column('varchar', { length: 64 })
  signatureSha256: string;

  @Column('varchar', { length: 300 })
  pdfKey: string;

  @Column('varchar', { length: 64 })
  pdfSha256: string;

  /** SHA-256 of the canonical signed content; printed in the PDF footer. */
  @Column('varchar', { length: 64 })
  contentSha256: string;

  @Column('varchar', { length: 64 })
  timeZone: string;

  @Column('varchar', { length: 30, nullable: true })
  shownAt: string | null;

  @Column('varchar', { length: 30 })
  signedAt: string;

  /** The staff user who started the hand-over. */
  @Column('varchar', { length: 36, nullable: true })
  startedById: string | null;

  @Column('varchar', { length: 64, nullable: true })
  signedIp: string | null;

  @Column('varchar', { length: 300, nullable: true })
  signedUserAgent: string | null;

  @Column('varchar', { length: 30, nullable: true })
  withdrawnAt: string | null;

  @Column('varchar', { length: 36, nullable: true })
  withdrawnById: string | null;

  @Column('text', { nullable: true })
  withdrawalReason: string | null;

  /** The day the patient asked to withdraw (YYYY-MM-DD), which may be before it was recorded. */
  @Column('varchar', { length: 10, nullable: true })
  withdrawalDate: string | null;

  /** Place in the tamper-evident chain, with the previous row's chain hash and this row's content hash; set on insert (features/integrity/chain.ts). */
  @Column('integer', { nullable: true })
  chainSeq: number;

  @Column('varchar', { length: 64, nullable: true })
  prevHash: string;

  @Column('varchar', { length: 64, nullable: true })
  rowHash: string;
}
