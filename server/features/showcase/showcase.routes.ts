import type { Router } from 'express';
import sharp from 'sharp';
import { In } from 'typeorm';
import { z } from 'zod';
import { allow, CLINICAL, currentUser } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { ConsentRecord } from '../../entities/consent-record.js';
import { Patient } from '../../entities/patient.js';
import { Photo } from '../../entities/photo.js';
import { ShowcaseExport, ShowcaseRequest, type ExportedFile } from '../../entities/showcase.js';
import { User } from '../../entities/user.js';
import { audit, auditListRead, auditPatientRead } from '../../lib/audit.js';
import { HttpError, notFound } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { patientDocumentKey } from '../../storage/keys.js';
import { sha256Hex } from '../consents/hash.js';
import { getSettings } from '../settings/settings.service.js';
import { composeExport, renderPanel } from './showcase-images.js';
import { createShowcaseRequestSchema, decisionSchema, declineSchema, exportSchema, queueQuerySchema, withdrawRequestSchema } from './showcase.schemas.js';
import { assertCovered, currentShowcaseConsent, photosForRequest } from './showcase.service.js';

const idParams = z.object({ id: uuidParam });
const fileParams = z.object({ id: uuidParam, name: z.string().regex(/^[a-z0-9-]{1,40}$/, 'Not a valid file name.') });

export function registerShowcaseRoutes(r: Router, { db, config, storage, mailer }: Deps): void {
  const requests = db.getRepository(ShowcaseRequest);

  /** What a request looks like to staff: with its photos, the consent behind it, people and exports. */
  async function views(rows: ShowcaseRequest[]) {
    if (!rows.length) return [];
    const userIds = [...new Set(rows.flatMap((r) => [r.requestedById, r.decidedById].filter((x): x is string => Boolean(x))))];
    const [users, consents, patients, exports] = await Promise.all([
      db.getRepository(User).findBy({ id: In(userIds) }),
      db.getRepository(ConsentRecord).findBy({ id: In(rows.map((r) => r.consentId)) }),
      db.getRepository(Patient).findBy({ id: In(rows.map((r) => r.patientId)) }),
      db.getRepository(ShowcaseExport).find({ where: { requestId: In(rows.map((r) => r.id)) }, order: { exportedAt: 'ASC' } }),
    ]);
    const name = (id: string | null) => users.find((u) => u.id === id)?.name ?? null;
    return rows.map((r) => {
      const c = consents.find((x) => x.id === r.consentId);
      const p = patients.find((x) => x.id === r.patientId);
      return {
        ...r,
        patient: p ? { id: p.id, code: p.code, firstName: p.firstName, lastName: p.lastName } : null,
        requestedByName: name(r.requestedById),
        decidedByName: name(r.decidedById),
        consent: c ? { id: c.id, templateVersion: c.templateVersion, signedAt: c.signedAt, channels: JSON.parse(c.channels), crop: c.crop ?? 'lips-only', withdrawnAt: c.withdrawnAt } : null,
        photos: r.photoIds.map((id) => ({ id, thumbUrl: `/api/photos/${id}/file?variant=thumb&format=webp`, displayUrl: `/api/photos/${id}/file?variant=display&format=webp` })),
        exports: exports
          .filter((e) => e.requestId === r.id)
          .map((e) => ({ ...e, files: e.files.map(({ key: _key, ...f }) => ({ ...f, url: `/api/showcase-exports/${e.id}/files/${f.name}` })) })),
      };
    });
  }

  const one = validate({ params: idParams });
  /** The patient's showcase consent and requests, for the compare screen's "nominate" action. */
  r.get('/api/patients/:id/showcase', allow(...CLINICAL), one, async (req, res) => {
    const { params } = parsed(req, one);
    if (!(await db.getRepository(Patient).existsBy({ id: params.id }))) throw notFound('Patient');
    const status = await currentShowcaseConsent(db, params.id);
    await auditPatientRead(db, req, { action: 'showcase.status.view', patientId: params.id, targetType: 'patient', targetId: params.id });
    const rows = await requests.find({ where: { patientId: params.id }, order: { requestedAt: 'DESC' } });
    res.json({
      consent: status.consent ? { id: status.consent.id, templateVersion: status.consent.templateVersion, signedAt: status.consent.signedAt, channels: status.channels, crop: status.crop } : null,
      requests: await views(rows),
    });
  });

  const create = validate({ params: idParams, body: createShowcaseRequestSchema });
  r.post('/api/patients/:id/showcase-requests', allow(...CLINICAL), create, async (req, res) => {
    const { params, body } = parsed(req, create);
    if (!(await db.getRepository(Patient).existsBy({ id: params.id }))) throw notFound('Patient');
    const photos = await photosForRequest(db, params.id, body.viewKey, body.photoIds);
    const status = await currentShowcaseConsent(db, params.id);
    assertCovered(status, body.channels);
    const row: ShowcaseRequest = requests.create({
      id: newId(),
      patientId: params.id,
      viewKey: body.viewKey,
      photoIds: photos.map((p) => p.id),
      channels: body.channels,
      crop: status.crop ?? 'lips-only',
      consentId: status.consent!.id,
      state: 'requested',
      requestNote: body.note ?? '',
      requestedById: currentUser(req).id,
      requestedAt: nowIso(),
      decidedById: null,
      decidedAt: null,
      decisionNote: null,
      withdrawnAt: null,
      withdrawnReason: null,
    });
    await db.transaction(async (tx) => {
      await tx.getRepository(ShowcaseRequest).insert(row);
      await audit(tx, req, { action: 'showcase.request', patientId: row.patientId, targetType: 'showcase_request', targetId: row.id, details: { channels: row.channels, photos: row.photoIds.length } });
    });
    res.status(201).json((await views([row]))[0]);
  });

  const queue = validate({ query: queueQuerySchema });
  r.get('/api/showcase-requests', allow('admin'), queue, async (req, res) => {
    const { query } = parsed(req, queue);
    const rows = await requests.find({ where: query.state ? { state: query.state } : {}, order: { requestedAt: 'DESC' }, take: 200 });
    await auditListRead(db, req, 'showcase-queue', { state: query.state ?? null });
    res.json(await views(rows));
  });

  /** Loads a request and checks its state; state changes also meet a database trigger. */
  async function load(id: string, states: ShowcaseRequest['state'][]) {
    const row = await requests.findOneBy({ id });
    if (!row) throw notFound('Showcase request');
    if (!states.includes(row.state)) throw new HttpError(409, 'WRONG_STATE', `This request is ${row.state}; that action needs it to be ${states.join(' or ')}.`);
    return row;
  }

  const clear = validate({ params: idParams, body: decisionSchema });
  r.post('/api/showcase-requests/:id/clear', allow('admin'), clear, async (req, res) => {
    const { params, body } = parsed(req, clear);
    const row = await load(params.id, ['requested']);
    // Cleared only under a consent that is still current and still covers every channel.
    const status = await currentShowcaseConsent(db, row.patientId);
    assertCovered(status, row.channels);
    Object.assign(row, { state: 'cleared', decidedById: currentUser(req).id, decidedAt: nowIso(), decisionNote: body.note ?? null, consentId: status.consent!.id, crop: status.crop ?? row.crop });
    await db.transaction(async (tx) => {
      await tx.getRepository(ShowcaseRequest).save(row);
      await audit(tx, req, { action: 'showcase.clear', patientId: row.patientId, targetType: 'showcase_request', targetId: row.id });
    });
    res.json((await views([row]))[0]);
  });

  const decline = validate({ params: idParams, body: declineSchema });
  r.post('/api/showcase-requests/:id/decline', allow('admin'), decline, async (req, res) => {
    const { params, body } = parsed(req, decline);
    const row = await load(params.id, ['requested']);
    Object.assign(row, { state: 'declined', decidedById: currentUser(req).id, decidedAt: nowIso(), decisionNote: body.note });
    await db.transaction(async (tx) => {
      await tx.getRepository(ShowcaseRequest).save(row);
      await audit(tx, req, { action: 'showcase.decline', patientId: row.patientId, targetType: 'showcase_request', targetId: row.id });
    });
    res.json((await views([row]))[0]);
  });

  const pull = validate({ params: idParams, body: withdrawRequestSchema });
  r.post('/api/showcase-requests/:id/withdraw', allow('admin'), pull, async (req, res) => {
    const { params, body } = parsed(req, pull);
    const row = await load(params.id, ['requested', 'cleared']);
    Object.assign(row, { state: 'withdrawn', withdrawnAt: nowIso(), withdrawnReason: body.reason });
    await db.transaction(async (tx) => {
      await tx.getRepository(ShowcaseRequest).save(row);
      await audit(tx, req, { action: 'showcase.withdrawn', patientId: row.patientId, targetType: 'showcase_request', targetId: row.id, details: { cause: 'admin' } });
    });
    res.json((await views([row]))[0]);
  });

  const exp = validate({ params: idParams, body: exportSchema });
  r.post('/api/showcase-requests/:id/exports', allow('admin'), exp, async (req, res) => {
    const { params, body } = parsed(req, exp);
    const row = await load(params.id, ['cleared']);
    if (!row.channels.includes(body.channel)) throw new HttpError(409, 'CHANNEL_NOT_CLEARED', 'This request was not cleared for that channel.');
    const status = await currentShowcaseConsent(db, row.patientId);
    assertCovered(status, [body.channel]);
    const crop = status.crop === 'face' && row.crop === 'face' ? 'face' : 'lips-only';
    const photos = await db.getRepository(Photo).findBy({ id: In(row.photoIds) });
    photos.sort((a, b) => (a.capturedAt < b.capturedAt ? -1 : 1));
    const settings = await getSettings(db, config);
    const panels = await Promise.all(photos.map((p) => renderPanel(storage, p, crop)));
    const first = photos[0].capturedAt;
    const labels = photos.map((p, i) => (i === 0 ? 'Before' : `After · ${Math.max(1, Math.round((Date.parse(p.capturedAt) - Date.parse(first)) / (7 * 86_400_000)))} weeks`));
    const composite = await composeExport(panels, labels, settings.showcaseCaption, settings.watermarkText);
    const single = await Promise.all(panels.map((p, i) => composeExport([p], [labels[i]], settings.showcaseCaption, settings.watermarkText)));

    const exportId = newId();
    const files: ExportedFile[] = [];
    const outputs: [string, Buffer][] = [['composite', composite], ...single.map((b, i) => [`photo-${i + 1}`, b] as [string, Buffer])];
    try {
      for (const [name, bytes] of outputs) {
        const key = patientDocumentKey({ patientId: row.patientId, area: 'showcase', id: exportId, name, ext: 'jpg' });
        await storage.put(key, bytes, 'image/jpeg');
        const { width, height } = await sharp(bytes).metadata();
        files.push({ name, key, sha256: sha256Hex(bytes), bytes: bytes.length, width: width!, height: height! });
      }
      const record = db.getRepository(ShowcaseExport).create({ id: exportId, requestId: row.id, patientId: row.patientId, channel: body.channel, exportedById: currentUser(req).id, exportedAt: nowIso(), files });
      await db.transaction(async (tx) => {
        // The request must still be cleared at the moment the export is recorded (a withdrawal may have won the race).
        const still = await tx.getRepository(ShowcaseRequest).findOneBy({ id: row.id, state: 'cleared' });
        if (!still) throw new HttpError(409, 'WRONG_STATE', 'This request was withdrawn while the export was being prepared. Nothing was exported.');
        await tx.getRepository(ShowcaseExport).insert(record);
        await audit(tx, req, { action: 'showcase.export', patientId: row.patientId, targetType: 'showcase_export', targetId: exportId, details: { channel: body.channel, crop, files: files.map((f) => ({ name: f.name, sha256: f.sha256 })) } });
      });
      mailer.kick();
      res.status(201).json({ ...record, files: files.map(({ key: _k, ...f }) => ({ ...f, url: `/api/showcase-exports/${exportId}/files/${f.name}` })) });
    } catch (err) {
      await storage.remove(files.map((f) => f.key)).catch(() => undefined);
      throw err;
    }
  });

  const file = validate({ params: fileParams });
  r.get('/api/showcase-exports/:id/files/:name', allow('admin'), file, async (req, res) => {
    const { params } = parsed(req, file);
    const record = await db.getRepository(ShowcaseExport).findOneBy({ id: params.id });
    const f = record?.files.find((x) => x.name === params.name);
    if (!record || !f) throw notFound('Export file');
    const request = await requests.findOneBy({ id: record.requestId });
    if (request?.state !== 'cleared') throw new HttpError(409, 'WITHDRAWN', 'This showcase use has been withdrawn; its exports can no longer be downloaded.');
    await audit(db, req, { action: 'showcase.export_view', patientId: record.patientId, targetType: 'showcase_export', targetId: record.id, details: { file: f.name } });
    res.set({ 'Content-Type': 'image/jpeg', 'Content-Disposition': `attachment; filename="showcase-${record.channel}-${f.name}.jpg"`, 'Cache-Control': 'no-store' });
    res.send(await storage.get(f.key));
  });
}
