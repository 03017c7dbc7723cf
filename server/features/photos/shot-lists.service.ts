import type { DataSource, EntityManager } from 'typeorm';
import { DEFAULT_SHOT_LIST_ID, ShotList, ShotListView } from '../../entities/shot-list.js';
import { notFound } from '../../lib/errors.js';

/** A shot list as the API shows it: views in order. */
export function shotListView(list: ShotList) {
  const views = [...(list.views ?? [])].sort((a, b) => a.position - b.position);
  return {
    id: list.id,
    name: list.name,
    archived: list.archived,
    isDefault: list.id === DEFAULT_SHOT_LIST_ID,
    createdAt: list.createdAt,
    updatedAt: list.updatedAt,
    views: views.map((v) => ({ key: v.key, label: v.label, hint: v.hint, anchorKind: v.anchorKind, position: v.position })),
  };
}
export type ShotListDto = ReturnType<typeof shotListView>;

export async function loadShotList(db: DataSource | EntityManager, id: string): Promise<ShotList> {
  const list = await db.getRepository(ShotList).findOne({ where: { id }, relations: { views: true } });
  if (!list) throw notFound('Shot list');
  return list;
}

/** The ordered views of a shot list (what the capture screen shows as slots). */
export async function viewsOf(db: DataSource | EntityManager, shotListId: string): Promise<ShotListView[]> {
  return db.getRepository(ShotListView).find({ where: { shotListId }, order: { position: 'ASC' } });
}
