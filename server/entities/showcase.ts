import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

export const SHOWCASE_CHANNELS = ['clinic-website', 'social-media', 'print', 'professional-education'] as const;
export type ShowcaseChannel = (typeof SHOWCASE_CHANNELS)[number];
export type ShowcaseState = 'requested' | 'cleared' | 'declined' | 'withdrawn';

/** A result nominated for marketing use: requested → cleared / declined; cleared → withdrawn. */
@Entity('showcase_request')
@Index(['state', 'requestedAt'])
@Index(['patientId'])
export class ShowcaseRequest {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  patientId: string;

  @Column('varchar', { length: 40 })
  viewKey: string;

  /** Photo ids in time order: two for a pair, more for a strip. */
  @Column('simple-json')
  photoIds: string[];

  @Column('simple-json')
  channels: ShowcaseChannel[];

  /** What the consent allowed when the request was made: the whole face, or a lips-only crop. */
  @Column('varchar', { length: 12 })
  crop: 'face' | 'lips-only';

  /** The showcase consent that covered the request. */
  @Column('varchar', { length: 36 })
  consentId: string;

  @Column('varchar', { length: 12 })
  state: ShowcaseState;

  @Column('text', { default: '' })
  requestNote: string;

  @Column('varchar', { length: 36 })
  requestedById: string;

  @Column('varchar', { length: 30 })
  requestedAt: string;

  @Column('varchar', { length: 36, nullable: true })
  decidedById: string | null;

  @Column('varchar', { length: 30, nullable: true })
  decidedAt: string | null;

  @Column('text', { nullable: true })
  decisionNote: string | null;

  @Column('varchar', { length: 30, nullable: true })
  withdrawnAt: string | null;

  @Column('text', { nullable: true })
  withdrawnReason: string | null;
}

export interface ExportedFile {
  name: string;
  key: string;
  sha256: string;
  bytes: number;
  width: number;
  height: number;
}

/** One export of a cleared request for one channel: who, when, and the hashes of the files handed out. */
@Entity('showcase_export')
@Index(['requestId'])
export class ShowcaseExport {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  requestId: string;

  @Column('varchar', { length: 36 })
  patientId: string;

  @Column('varchar', { length: 30 })
  channel: ShowcaseChannel;

  @Column('varchar', { length: 36 })
  exportedById: string;

  @Column('varchar', { length: 30 })
  exportedAt: string;

  @Column('simple-json')
  files: ExportedFile[];
}
