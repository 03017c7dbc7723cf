import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

/**
 * A picture the patient brought to show what they would like (e.g. a saved image). Kept apart from clinical
 * photos (own table, own key area): never part of comparisons, measurements or showcase.
 */
@Entity('reference_picture')
@Index(['patientId', 'uploadedAt'])
export class ReferencePicture {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  patientId: string;

  @Column('varchar', { length: 36, nullable: true })
  visitId: string | null;

  @Column('varchar', { length: 300 })
  caption: string;

  /** Stripped JPEG in object storage (key from `patientDocumentKey`). */
  @Column('varchar', { length: 300 })
  key: string;

  @Column('varchar', { length: 300 })
  thumbKey: string;

  @Column('integer')
  width: number;

  @Column('integer')
  height: number;

  @Column('varchar', { length: 64 })
  sha256: string;

  @Column('varchar', { length: 36 })
  uploadedById: string;

  @Column('varchar', { length: 30 })
  uploadedAt: string;

  /** Set when removed from the record at the patient's request; the objects are deleted then. */
  @Column('varchar', { length: 30, nullable: true })
  removedAt: string | null;
}
