import type { Router } from 'express';
import { In } from 'typeorm';
import { z } from 'zod';
import { allow, CLINICAL } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Photo } from '../../entities/photo.js';
import { DEFAULT_SHOT_LIST_ID, ShotList, ShotListView } from '../../entities/shot-list.js';
import { Visit } from '../../entities/visit.js';
import { audit } from '../../lib/audit.js';
import { conflict, notFound } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { createShotListSchema, setVisitShotListSchema, shotListQuerySchema, updateShotListSchema } from './photos.schemas.js';
import { loadShotList, shotListView } from './shot-lists.service.js';

const idParams = z.object({ id: uuidParam });

/** Shot lists: clinicians read them, admins write them (DESIGN §2). Lists are never deleted, only archived. */
export function registerShotListRoutes(r: Router, { db }: Deps): void {
  const lists = db.getRepository(ShotList);

  const list = validate({ query: shotListQuerySchema });
  r.get('/api/shot-lists', allow(...CLINICAL), list, async (req, res) => {
    const { query } = parsed(req, list);
    const rows = await lists.find({ where: query.all === '1' ? {} : { archived: false }, relations: { views: true }, order: { name: 'ASC' } });
    // The built-in list first: it is what new visits use.
    rows.sort((a, b) => Number(b.id === DEFAULT_SHOT_LIST_ID) - Number(a.id === DEFAULT_SHOT_LIST_ID));
    res.json(rows.map(shotListView));
  });

  const one = validate({ params: idParams });
  r.get('/api/shot-lists/:id', allow(...CLINICAL), one, async (req, res) => {
    const { params } = parsed(req, one);
    res.json(shotListView(await loadShotList(db, params.id)));
  });

  const create = validate({ body: createShotListSchema });
  r.post('/api/shot-lists', allow('admin'), create, async (req, res) => {
    const { body } = parsed(req, create);
    const id = newId();
    const now = nowIso();
    await db.transaction(async (tx) => {
      await tx.getRepository(ShotList).insert({ id, name: body.name, archived: false, createdAt: now, updatedAt: now });
      await tx.getRepository(ShotListView).insert(body.views.map((v, position) => ({ id: newId(), shotListId: id, position, ...v })));
      await audit(tx, req, { action: 'shot-list.create', targetType: 'shot-list', targetId: id, details: { views: body.views.map((v) => v.key) } });
    });
    res.status(201).json(shotListView(await loadShotList(db, id)));
  });

  const update = validate({ params: idParams, body: updateShotListSchema });
  r.patch('/api/shot-lists/:id', allow('admin'), update, async (req, res) => {
    const { params, body } = parsed(req, update);
    await db.transaction(async (tx) => {
      const row = await loadShotList(tx, params.id);
      if (body.archived && row.id === DEFAULT_SHOT_LIST_ID) {
        throw conflict('The built-in shot list is what new visits use and cannot be archived.', undefined, 'DEFAULT_SHOT_LIST');
      }
      if (body.views) {
        const keep = new Set(body.views.map((v) => v.key));
        const dropped = (row.views ?? []).filter((v) => !keep.has(v.key)).map((v) => v.key);
        if (dropped.length) {
          const inUse = await tx
            .getRepository(Photo)
            .createQueryBuilder('p')
            .innerJoin(Visit, 'v', 'v.id = p.visitId')
            .where('v.shotListId = :id AND p.viewKey IN (:...dropped)', { id: row.id, dropped })
            .select('DISTINCT p.viewKey', 'viewKey')
            .getRawMany<{ viewKey: string }>();
          if (inUse.length) {
            throw conflict(
              `These views already have photos and must stay in the list: ${inUse.map((u) => u.viewKey).join(', ')}. Rename or move them instead.`,
              { views: inUse.map((u) => u.viewKey) },
              'VIEW_IN_USE',
            );
          }
          await tx.getRepository(ShotListView).delete({ shotListId: row.id, key: In(dropped) });
        }
        const existing = new Map((row.views ?? []).map((v) => [v.key, v]));
        for (const [position, v] of body.views.entries()) {
          const old = existing.get(v.key);
          if (old) await tx.getRepository(ShotListView).update({ id: old.id }, { position, label: v.label, hint: v.hint, anchorKind: v.anchorKind });
          else await tx.getRepository(ShotListView).insert({ id: newId(), shotListId: row.id, position, ...v });
        }
      }
      await tx.getRepository(ShotList).update(
        { id: row.id },
        { ...(body.name !== undefined ? { name: body.name } : {}), ...(body.archived !== undefined ? { archived: body.archived } : {}), updatedAt: nowIso() },
      );
      await audit(tx, req, { action: 'shot-list.edit', targetType: 'shot-list', targetId: row.id, details: { fields: Object.keys(body) } });
    });
    res.json(shotListView(await loadShotList(db, params.id)));
  });

  const choose = validate({ params: z.object({ visitId: uuidParam }), body: setVisitShotListSchema });
  r.put('/api/visits/:visitId/shot-list', allow(...CLINICAL), choose, async (req, res) => {
    const { params, body } = parsed(req, choose);
    const visit = await db.getRepository(Visit).findOneBy({ id: params.visitId });
    if (!visit) throw notFound('Visit');
    const target = await loadShotList(db, body.shotListId);
    if (target.archived && target.id !== visit.shotListId) throw conflict('This shot list is archived; choose a current one.', undefined, 'SHOT_LIST_ARCHIVED');
    await db.transaction(async (tx) => {
      await tx.getRepository(Visit).update({ id: visit.id }, { shotListId: target.id, updatedAt: nowIso() });
      await audit(tx, req, { action: 'visit.shot-list', patientId: visit.patientId, targetType: 'visit', targetId: visit.id, details: { shotListId: target.id } });
    });
    res.json(shotListView(target));
  });
}
