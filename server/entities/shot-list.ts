import { Column, Entity, Index, JoinColumn, ManyToOne, OneToMany, PrimaryColumn, type Relation } from 'typeorm';
import type { AnchorKind } from '../features/photos/photos.schemas.js';

/** The built-in "Lips & lower face" shot list; visits get it unless another list is chosen. */
export const DEFAULT_SHOT_LIST_ID = '2f6b5c1e-8a47-4d8e-9c1b-6a0d3e7f5a10';

/** An ordered set of standard views taken at a visit (DESIGN §3). Never deleted, only archived. */
@Entity('shot_list')
export class ShotList {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 80 })
  name: string;

  @Column('boolean', { default: false })
  archived: boolean;

  @OneToMany(() => ShotListView, (v) => v.shotList)
  views?: Relation<ShotListView>[];

  @Column('varchar', { length: 30 })
  createdAt: string;

  @Column('varchar', { length: 30 })
  updatedAt: string;
}

/** One view of a shot list. `key` is stable: photos refer to it. */
@Entity('shot_list_view')
@Index(['shotListId', 'key'], { unique: true })
export class ShotListView {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 36 })
  shotListId: string;

  @ManyToOne(() => ShotList, (l) => l.views, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'shotListId' })
  shotList?: Relation<ShotList>;

  /** 0-based place in the list. */
  @Column('integer')
  position: number;

  @Column('varchar', { length: 40 })
  key: string;

  @Column('varchar', { length: 60 })
  label: string;

  /** How to position the patient and camera, shown beside the slot. */
  @Column('text', { default: '' })
  hint: string;

  @Column('varchar', { length: 12 })
  anchorKind: AnchorKind;
}
