import { Column, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import type { AlignmentState, StoredAlignment, StoredLandmarks, StoredQuality } from '../features/landmarks/landmarks.schemas.js';
import type { PhotoFormat, PhotoState, PhotoVariantName } from '../features/photos/photos.schemas.js';
import type { LipMeasurements } from '../media/measurements.js';
import type { Pose } from '../media/pose.js';
import { Patient } from './patient.js';
import { User } from './user.js';
import { Visit } from './visit.js';

/** One stored object of a photo. Keys come only from `photoKey()`. */
export interface PhotoVariant {
  variant: PhotoVariantName;
  format: PhotoFormat;
  key: string;
  width: number;
  height: number;
  bytes: number;
  /** Set on variants rewritten in place (the aligned photo after a landmark edit); part of the URL and ETag. */
  rev?: number;
}

/**
 * A clinical photo of one view at one visit. Stored objects carry no metadata; a retake marks the earlier photo
 * `replaced` (never deleted) and points it at its successor.
 */
@Entity('photo')
@Index(['visitId', 'viewKey'])
@Index(['patientId', 'capturedAt'])
@Index(['visitId', 'viewKey', 'sourceSha256'], { unique: true })
@Index('UQ_photo_current_view', ['visitId', 'viewKey'], { unique: true, where: `"state" = 'captured'` })
export class Photo {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  patientId: string;

  @ManyToOne(() => Patient, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'patientId' })
  patient?: Relation<Patient>;

  @Column('varchar', { length: 36 })
  visitId: string;

  @ManyToOne(() => Visit, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'visitId' })
  visit?: Relation<Visit>;

  /** Key of the view in the visit's shot list, e.g. "frontal-rest". */
  @Column('varchar', { length: 40 })
  viewKey: string;

  @Column('varchar', { length: 12, default: 'captured' })
  state: PhotoState;

  /** The retake that replaced this photo. */
  @Column('varchar', { length: 36, nullable: true })
  replacedById: string | null;

  /** Size of the upright master in pixels. */
  @Column('integer')
  width: number;

  @Column('integer')
  height: number;

  /** UTC ISO time the photo was taken: from EXIF when the file says so, else the upload time. */
  @Column('varchar', { length: 30 })
  capturedAt: string;

  @Column('varchar', { length: 10 })
  captureTimeSource: 'exif' | 'upload';

  /** The EXIF orientation (1–8) the upload carried, before it was applied to the pixels. */
  @Column('integer', { nullable: true })
  sourceOrientation: number | null;

  @Column('varchar', { length: 30 })
  uploadedAt: string;

  @Column('varchar', { length: 36 })
  uploadedById: string;

  @ManyToOne(() => User)
  @JoinColumn({ name: 'uploadedById' })
  uploadedBy?: Relation<User>;

  /** SHA-256 (hex) of the stored master: lets anyone verify the archived file later. */
  @Column('varchar', { length: 64 })
  sha256: string;

  /** SHA-256 (hex) of the bytes as uploaded, to recognise the same file sent twice. */
  @Column('varchar', { length: 64 })
  sourceSha256: string;

  @Column('integer')
  sourceBytes: number;

  @Column('simple-json')
  variants: PhotoVariant[];

  /** Landmarks and alignment; "aligning" rows are picked up again by the alignment worker after a restart. */
  @Column('varchar', { length: 16, default: 'aligning' })
  alignmentState: AlignmentState;

  /** Why the photo needs landmarks placed by hand, in plain words. */
  @Column('text', { nullable: true })
  alignmentNote: string | null;

  @Column('integer', { default: 0 })
  alignmentAttempts: number;

  @Column('simple-json', { nullable: true })
  landmarks: StoredLandmarks | null;

  /** Bumped on every landmark edit or reset, so a stale alignment run cannot overwrite a newer one. */
  @Column('integer', { default: 0 })
  landmarksRev: number;

  @Column('simple-json', { nullable: true })
  alignment: StoredAlignment | null;

  @Column('simple-json', { nullable: true })
  pose: Pose | null;

  @Column('simple-json', { nullable: true })
  quality: StoredQuality | null;

  @Column('simple-json', { nullable: true })
  measurements: LipMeasurements | null;
}
