import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

export const CONSENT_KINDS = ['treatment', 'photography', 'showcase', 'screening'] as const;
export type ConsentKind = (typeof CONSENT_KINDS)[number];
export const TEMPLATE_STATUSES = ['draft', 'published', 'retired'] as const;
export type TemplateStatus = (typeof TEMPLATE_STATUSES)[number];
export const SHOWCASE_CHANNELS = ['clinic-website', 'social-media', 'print', 'professional-education'] as const;
export type ShowcaseChannel = (typeof SHOWCASE_CHANNELS)[number];
export const SHOWCASE_CROPS = ['face', 'lips-only'] as const;
export type ShowcaseCrop = (typeof SHOWCASE_CROPS)[number];

/** A question on a form. Answers are strings: "yes"/"no" for yes-no, the option for choice, free text for text. */
export interface TemplateQuestion {
  id: string;
  type: 'yes-no' | 'text' | 'choice';
  label: string;
  help?: string;
  options?: string[];
  required: boolean;
  /** Answers that need a clinician's review before treatment (e.g. ["yes"] for "Are you pregnant?"). */
  flagWhen?: string[];
}

/**
 * One version of a consent form or screening questionnaire. Versions of the same form share `familyId`.
 * Publishing freezes the content (a database trigger refuses later edits) and records its SHA-256;
 * a retired version can no longer be offered but stays readable for the records signed on it.
 */
@Entity('consent_template')
@Index(['familyId', 'version'], { unique: true })
@Index(['kind', 'status'])
export class ConsentTemplate {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  familyId: string;

  @Column('varchar', { length: 20 })
  kind: ConsentKind;

  @Column('integer')
  version: number;

  @Column('varchar', { length: 200 })
  title: string;

  /** Markdown, rendered without raw HTML. */
  @Column('text')
  body: string;

  /** JSON array of `TemplateQuestion`. */
  @Column('text', { default: '[]' })
  questions: string;

  /** JSON array of `ShowcaseChannel` offered (showcase consents only). */
  @Column('text', { default: '[]' })
  channels: string;

  @Column('varchar', { length: 12, default: 'draft' })
  status: TemplateStatus;

  /** SHA-256 of the canonical published content; null while a draft. */
  @Column('varchar', { length: 64, nullable: true })
  sha256: string | null;

  @Column('varchar', { length: 36, nullable: true })
  createdById: string | null;

  @Column('varchar', { length: 30 })
  createdAt: string;

  @Column('varchar', { length: 30 })
  updatedAt: string;

  @Column('varchar', { length: 30, nullable: true })
  publishedAt: string | null;

  @Column('varchar', { length: 36, nullable: true })
  publishedById: string | null;

  @Column('varchar', { length: 30, nullable: true })
  retiredAt: string | null;

  @Column('varchar', { length: 36, nullable: true })
  retiredById: string | null;
}
