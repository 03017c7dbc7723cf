import type { Router } from 'express';
import { IsNull, Not } from 'typeorm';
import { z } from 'zod';
import { allow, currentUser, STAFF } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { ConsentTemplate } from '../../entities/consent-template.js';
import { audit } from '../../lib/audit.js';
import { conflict, notFound } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { createTemplateSchema, templateListQuerySchema, updateTemplateSchema } from './templates.schemas.js';
import { templateSha256, templateView } from './templates.service.js';

const idParams = z.object({ id: uuidParam });

const frozen = (t: ConsentTemplate) =>
  conflict(
    `Version ${t.version} of "${t.title}" is ${t.status}; its text can no longer change. Create a new version instead.`,
    { status: t.status },
    'TEMPLATE_NOT_DRAFT',
  );

/** Consent form templates: admins write and publish them; all staff read them to start a hand-over. */
/** The lifecycle fields of a new draft: unpublished, unhashed, not retired. */
const draftFields = (userId: string, now: string) => ({
  status: 'draft' as const,
  sha256: null,
  createdById: userId,
  createdAt: now,
  updatedAt: now,
  publishedAt: null,
  publishedById: null,
  retiredAt: null,
  retiredById: null,
});

export function registerTemplateRoutes(r: Router, { db }: Deps): void {
  const templates = db.getRepository(ConsentTemplate);

  const list = validate({ query: templateListQuerySchema });
  r.get('/api/consent-templates', allow(...STAFF), list, async (req, res) => {
    const { query } = parsed(req, list);
    const rows = await templates.find({
      where: { ...(query.kind ? { kind: query.kind } : {}), ...(query.status ? { status: query.status } : {}) },
      order: { kind: 'ASC', title: 'ASC', version: 'DESC' },
    });
    res.json(rows.map(templateView));
  });

  const one = validate({ params: idParams });
  r.get('/api/consent-templates/:id', allow(...STAFF), one, async (req, res) => {
    const { params } = parsed(req, one);
    const t = await templates.findOneBy({ id: params.id });
    if (!t) throw notFound('Consent template');
    res.json(templateView(t));
  });

  const create = validate({ body: createTemplateSchema });
  r.post('/api/consent-templates', allow('admin'), create, async (req, res) => {
    const { body } = parsed(req, create);
    const now = nowIso();
    const row = templates.create({
      id: newId(),
      familyId: newId(),
      kind: body.kind,
      version: 1,
      title: body.title,
      body: body.body,
      questions: JSON.stringify(body.questions),
      channels: JSON.stringify(body.channels),
      ...draftFields(currentUser(req).id, now),
    });
    await db.transaction(async (tx) => {
      await tx.getRepository(ConsentTemplate).insert(row);
      await audit(tx, req, { action: 'consent_template.create', targetType: 'consent_template', targetId: row.id, details: { kind: row.kind } });
    });
    res.status(201).json(templateView(row));
  });

  const update = validate({ params: idParams, body: updateTemplateSchema });
  r.patch('/api/consent-templates/:id', allow('admin'), update, async (req, res) => {
    const { params, body } = parsed(req, update);
    const saved = await db.transaction(async (tx) => {
      const repo = tx.getRepository(ConsentTemplate);
      const t = await repo.findOneBy({ id: params.id });
      if (!t) throw notFound('Consent template');
      if (t.status !== 'draft') throw frozen(t);
      const channels = body.channels ?? JSON.parse(t.channels);
      createTemplateSchema.parse({ kind: t.kind, title: body.title ?? t.title, body: body.body ?? t.body, questions: body.questions ?? JSON.parse(t.questions), channels });
      if (body.title !== undefined) t.title = body.title;
      if (body.body !== undefined) t.body = body.body;
      if (body.questions !== undefined) t.questions = JSON.stringify(body.questions);
      if (body.channels !== undefined) t.channels = JSON.stringify(body.channels);
      t.updatedAt = nowIso();
      await repo.save(t);
      await audit(tx, req, { action: 'consent_template.edit', targetType: 'consent_template', targetId: t.id, details: { fields: Object.keys(body) } });
      return t;
    });
    res.json(templateView(saved));
  });

  r.delete('/api/consent-templates/:id', allow('admin'), one, async (req, res) => {
    const { params } = parsed(req, one);
    await db.transaction(async (tx) => {
      const repo = tx.getRepository(ConsentTemplate);
      const t = await repo.findOneBy({ id: params.id });
      if (!t) throw notFound('Consent template');
      if (t.status !== 'draft') throw frozen(t);
      await repo.delete({ id: t.id, status: 'draft' });
      await audit(tx, req, { action: 'consent_template.delete_draft', targetType: 'consent_template', targetId: t.id });
    });
    res.status(204).end();
  });

  r.post('/api/consent-templates/:id/versions', allow('admin'), one, async (req, res) => {
    const { params } = parsed(req, one);
    const draft = await db.transaction(async (tx) => {
      const repo = tx.getRepository(ConsentTemplate);
      const from = await repo.findOneBy({ id: params.id });
      if (!from) throw notFound('Consent template');
      const open = await repo.findOneBy({ familyId: from.familyId, status: 'draft' });
      if (open) throw conflict(`Version ${open.version} of this form is already a draft; edit that one.`, { draftId: open.id }, 'DRAFT_EXISTS');
      const latest = await repo.findOne({ where: { familyId: from.familyId }, order: { version: 'DESC' } });
      const now = nowIso();
      const row = repo.create({
        ...from,
        id: newId(),
        version: (latest?.version ?? from.version) + 1,
        ...draftFields(currentUser(req).id, now),
      });
      await repo.insert(row);
      await audit(tx, req, { action: 'consent_template.new_version', targetType: 'consent_template', targetId: row.id, details: { from: from.id, version: row.version } });
      return row;
    });
    res.status(201).json(templateView(draft));
  });

  r.post('/api/consent-templates/:id/publish', allow('admin'), one, async (req, res) => {
    const { params } = parsed(req, one);
    const published = await db.transaction(async (tx) => {
      const repo = tx.getRepository(ConsentTemplate);
      const t = await repo.findOneBy({ id: params.id });
      if (!t) throw notFound('Consent template');
      if (t.status !== 'draft') throw frozen(t);
      createTemplateSchema.parse({ kind: t.kind, title: t.title, body: t.body, questions: JSON.parse(t.questions), channels: JSON.parse(t.channels) });
      const now = nowIso();
      const userId = currentUser(req).id;
      // Only one version of a form is offered at a time: publishing retires the one before.
      const previous = await repo.findBy({ familyId: t.familyId, status: 'published', id: Not(t.id) });
      for (const p of previous) {
        await repo.update({ id: p.id, retiredAt: IsNull() }, { status: 'retired', retiredAt: now, retiredById: userId, updatedAt: now });
      }
      Object.assign(t, { status: 'published', sha256: templateSha256(t), publishedAt: now, publishedById: userId, updatedAt: now });
      await repo.save(t);
      await audit(tx, req, { action: 'consent_template.publish', targetType: 'consent_template', targetId: t.id, details: { version: t.version, sha256: t.sha256, retired: previous.map((p) => p.id) } });
      return t;
    });
    res.json(templateView(published));
  });

  r.post('/api/consent-templates/:id/retire', allow('admin'), one, async (req, res) => {
    const { params } = parsed(req, one);
    const retired = await db.transaction(async (tx) => {
      const repo = tx.getRepository(ConsentTemplate);
      const t = await repo.findOneBy({ id: params.id });
      if (!t) throw notFound('Consent template');
      if (t.status !== 'published') {
        throw conflict(t.status === 'draft' ? 'A draft is not offered yet; delete it instead.' : 'This version is already retired.', { status: t.status }, 'TEMPLATE_NOT_PUBLISHED');
      }
      const now = nowIso();
      Object.assign(t, { status: 'retired', retiredAt: now, retiredById: currentUser(req).id, updatedAt: now });
      await repo.save(t);
      await audit(tx, req, { action: 'consent_template.retire', targetType: 'consent_template', targetId: t.id, details: { version: t.version } });
      return t;
    });
    res.json(templateView(retired));
  });
}
