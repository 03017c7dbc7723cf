import { createHash } from 'node:crypto';
import { pipeline } from 'node:stream/promises';
import type { RequestHandler, Router } from 'express';
import multer from 'multer';
import { IsNull } from 'typeorm';
import { z } from 'zod';
import { allow, CLINICAL, currentUser } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Patient } from '../../entities/patient.js';
import { ReferencePicture } from '../../entities/reference-picture.js';
import { Visit } from '../../entities/visit.js';
import { audit, auditPatientRead } from '../../lib/audit.js';
import { badRequest, HttpError, notFound } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { decodePipeline, inspectHeader } from '../../media/decode.js';
import { patientDocumentKey } from '../../storage/keys.js';

/** Pictures the patient brings are reference only: a modest size is enough and keeps them apart in character too. */
const MAX_BYTES = 20 * 1024 * 1024;
const DISPLAY_EDGE = 1600;
const THUMB_EDGE = 320;
/** Keys live in their own area of the patient's prefix, never beside clinical photos. */
const AREA = 'reference-pictures';

const idParams = z.object({ id: uuidParam });
const fieldsSchema = z
  .object({
    caption: z
      .string()
      .trim()
      .max(300, 'Use at most 300 characters.')
      .refine((s) => !/[\p{Cc}]/u.test(s), 'Use printable characters only.')
      .default(''),
    visitId: z.string().uuid('Not a valid visit id.').optional(),
  })
  .strict();
const fileQuery = z.object({ variant: z.enum(['display', 'thumb']).default('display') }).strict();

const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_BYTES, files: 1, fields: 4, parts: 6, fieldSize: 1024 } }).single('picture');
const receive: RequestHandler = (req, res, next) =>
  upload(req, res, (err?: unknown) => {
    if (!err) return next();
    if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_SIZE') return next(new HttpError(413, 'FILE_TOO_LARGE', `The picture is larger than ${MAX_BYTES / 1024 / 1024} MB.`));
    next(new HttpError(400, 'BAD_UPLOAD', 'Send one picture in the form field "picture".'));
  });

function view(p: ReferencePicture) {
  return { id: p.id, patientId: p.patientId, visitId: p.visitId, caption: p.caption, width: p.width, height: p.height, uploadedAt: p.uploadedAt };
}

/**
 * The patient's own reference pictures ("lips I like"): uploaded like photos (checked, upright, metadata stripped)
 * but stored and listed apart from clinical photos, and never offered to comparisons, measurements or showcase.
 */
export function registerReferencePictureRoutes(r: Router, { db, storage }: Deps): void {
  const pictures = db.getRepository(ReferencePicture);

  const create = validate({ params: idParams });
  r.post('/api/patients/:id/reference-pictures', allow(...CLINICAL), create, receive, async (req, res) => {
    const { params } = parsed(req, create);
    const fields = fieldsSchema.parse(req.body ?? {});
    if (!(await db.getRepository(Patient).existsBy({ id: params.id }))) throw notFound('Patient');
    if (fields.visitId && !(await db.getRepository(Visit).existsBy({ id: fields.visitId, patientId: params.id }))) {
      throw badRequest("That visit is not one of this patient's.", [{ path: 'visitId', message: 'Choose a visit of this patient.' }]);
    }
    const file = req.file;
    if (!file) throw new HttpError(400, 'NO_FILE', 'Choose a picture to upload.');
    await inspectHeader(file.buffer);
    let display: { data: Buffer; info: { width: number; height: number } };
    let thumb: Buffer;
    try {
      display = await decodePipeline(file.buffer).resize(DISPLAY_EDGE, DISPLAY_EDGE, { fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 85 }).toBuffer({ resolveWithObject: true });
      thumb = await decodePipeline(file.buffer).resize(THUMB_EDGE, THUMB_EDGE, { fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 80 }).toBuffer();
    } catch (err) {
      throw new HttpError(422, 'IMAGE_DAMAGED', 'The picture is damaged or incomplete.', { reason: (err as Error).message });
    }
    const id = newId();
    const key = patientDocumentKey({ patientId: params.id, area: AREA, id, name: 'display', ext: 'jpg' });
    const thumbKey = patientDocumentKey({ patientId: params.id, area: AREA, id, name: 'thumb', ext: 'jpg' });
    const row = pictures.create({
      id,
      patientId: params.id,
      visitId: fields.visitId ?? null,
      caption: fields.caption,
      key,
      thumbKey,
      width: display.info.width,
      height: display.info.height,
      sha256: createHash('sha256').update(display.data).digest('hex'),
      uploadedById: currentUser(req).id,
      uploadedAt: nowIso(),
      removedAt: null,
    });
    // Objects first, then the row; if the row cannot be written, the objects go again.
    await storage.put(key, display.data, 'image/jpeg');
    await storage.put(thumbKey, thumb, 'image/jpeg');
    try {
      await db.transaction(async (tx) => {
        await tx.getRepository(ReferencePicture).insert(row);
        await audit(tx, req, { action: 'reference-picture.upload', patientId: params.id, targetType: 'reference-picture', targetId: id });
      });
    } catch (err) {
      await storage.remove([key, thumbKey]).catch(() => undefined);
      throw err;
    }
    res.status(201).json(view(row));
  });

  const list = validate({ params: idParams });
  r.get('/api/patients/:id/reference-pictures', allow(...CLINICAL), list, async (req, res) => {
    const { params } = parsed(req, list);
    if (!(await db.getRepository(Patient).existsBy({ id: params.id }))) throw notFound('Patient');
    const rows = await pictures.find({ where: { patientId: params.id, removedAt: IsNull() }, order: { uploadedAt: 'DESC' } });
    await auditPatientRead(db, req, { action: 'reference-picture.list', patientId: params.id, targetType: 'patient', targetId: params.id });
    res.json(rows.map(view));
  });

  const file = validate({ params: idParams, query: fileQuery });
  r.get('/api/reference-pictures/:id/file', allow(...CLINICAL), file, async (req, res) => {
    const { params, query } = parsed(req, file);
    const p = await pictures.findOneBy({ id: params.id, removedAt: IsNull() });
    if (!p) throw notFound('Reference picture');
    const read = { action: `reference-picture.${query.variant === 'display' ? 'view' : 'thumbnail.view'}`, patientId: p.patientId, targetType: 'reference-picture', targetId: p.id };
    // A full-size view is its own entry; thumbnails are covered by the screen's entry (see auditPatientRead).
    await (query.variant === 'display' ? audit(db, req, read) : auditPatientRead(db, req, read));
    const object = await storage.stream(query.variant === 'thumb' ? p.thumbKey : p.key);
    res.set({ 'Content-Type': 'image/jpeg', 'Cache-Control': 'private, max-age=31536000, immutable', ETag: `"${p.id}-${query.variant}"` });
    if (req.fresh) {
      object.body.destroy();
      res.status(304).end();
      return;
    }
    await pipeline(object.body, res);
  });

  const remove = validate({ params: idParams });
  r.delete('/api/reference-pictures/:id', allow(...CLINICAL), remove, async (req, res) => {
    const { params } = parsed(req, remove);
    const p = await pictures.findOneBy({ id: params.id, removedAt: IsNull() });
    if (!p) throw notFound('Reference picture');
    await db.transaction(async (tx) => {
      await tx.getRepository(ReferencePicture).update({ id: p.id }, { removedAt: nowIso() });
      await audit(tx, req, { action: 'reference-picture.remove', patientId: p.patientId, targetType: 'reference-picture', targetId: p.id });
    });
    // The pictures are the patient's, kept only for the consultation: removed means gone from storage too.
    await storage.remove([p.key, p.thumbKey]);
    res.status(204).end();
  });
}
