import { pipeline } from 'node:stream/promises';
import type { Request, RequestHandler, Router } from 'express';
import multer from 'multer';
import { z } from 'zod';
import { allow, CLINICAL, currentUser } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Patient } from '../../entities/patient.js';
import { Photo } from '../../entities/photo.js';
import { Visit } from '../../entities/visit.js';
import { audit, auditPatientRead } from '../../lib/audit.js';
import { badRequest, conflict, HttpError, notFound } from '../../lib/errors.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { ingestPhoto } from '../../media/ingest.js';
import { MAX_UPLOAD_BYTES, photoFileQuerySchema, uploadPhotoFieldsSchema, visitPhotosQuerySchema } from './photos.schemas.js';
import { registerShotListRoutes } from './shot-lists.routes.js';
import { viewsOf } from './shot-lists.service.js';

/** A photo as the API shows it: no storage keys, a URL per stored variant instead. */
export function photoView(p: Photo, extra: { visitStartsAt?: string; uploadedByName?: string | null } = {}) {
  return {
    id: p.id,
    patientId: p.patientId,
    visitId: p.visitId,
    viewKey: p.viewKey,
    state: p.state,
    replacedById: p.replacedById,
    width: p.width,
    height: p.height,
    capturedAt: p.capturedAt,
    captureTimeSource: p.captureTimeSource,
    uploadedAt: p.uploadedAt,
    uploadedById: p.uploadedById,
    uploadedByName: extra.uploadedByName ?? p.uploadedBy?.name ?? null,
    sha256: p.sha256,
    sourceSha256: p.sourceSha256,
    alignmentState: p.alignmentState,
    alignmentNote: p.alignmentNote,
    ...(extra.visitStartsAt ? { visitStartsAt: extra.visitStartsAt } : {}),
    variants: p.variants.map((v) => ({
      variant: v.variant,
      format: v.format,
      width: v.width,
      height: v.height,
      bytes: v.bytes,
      url: `/api/photos/${p.id}/file?variant=${v.variant}&format=${v.format}${v.rev ? `&rev=${v.rev}` : ''}`,
    })),
  };
}
export type PhotoDto = ReturnType<typeof photoView>;

const MULTER_MESSAGES: Partial<Record<multer.ErrorCode, [number, string]>> = {
  LIMIT_FILE_SIZE: [413, `The file is larger than ${MAX_UPLOAD_BYTES / 1024 / 1024} MB. Export the photo at a smaller size and upload it again.`],
  LIMIT_FILE_COUNT: [400, 'Send one photo per upload.'],
  LIMIT_UNEXPECTED_FILE: [400, 'Send the photo in the form field "photo", one file per upload.'],
  LIMIT_PART_COUNT: [400, 'The upload has too many parts.'],
  LIMIT_FIELD_COUNT: [400, 'The upload has too many form fields.'],
  LIMIT_FIELD_VALUE: [400, 'A form field of the upload is too long.'],
  LIMIT_FIELD_KEY: [400, 'A form field name of the upload is too long.'],
};

const multerUpload = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: MAX_UPLOAD_BYTES, files: 1, fields: 8, parts: 10, fieldSize: 1024, fieldNameSize: 64 },
}).single('photo');

/** Reads the multipart upload into memory and turns multer's errors into the API's error shape. */
const receivePhoto: RequestHandler = (req, res, next) => {
  multerUpload(req, res, (err?: unknown) => {
    if (!err) return next();
    if (err instanceof multer.MulterError) {
      const [status, message] = MULTER_MESSAGES[err.code] ?? [400, err.message];
      return next(new HttpError(status, err.code === 'LIMIT_FILE_SIZE' ? 'FILE_TOO_LARGE' : 'BAD_UPLOAD', message, { field: err.field }));
    }
    next(new HttpError(400, 'BAD_UPLOAD', 'The upload was cut off or is not a valid multipart form. Please try again.'));
  });
};

const visitParams = z.object({ visitId: uuidParam });
const idParams = z.object({ id: uuidParam });

function fileName(p: Photo, ext: string, variant: string) {
  return `photo-${p.viewKey}-${p.capturedAt.slice(0, 10)}-${variant}.${ext}`;
}

export function registerPhotoRoutes(r: Router, deps: Deps): void {
  const { db, storage } = deps;
  const photos = db.getRepository(Photo);
  const visits = db.getRepository(Visit);

  // The form fields arrive inside the multipart body, so validation follows multer.
  const uploadForm = validate({ params: visitParams, body: uploadPhotoFieldsSchema });
  r.post('/api/visits/:visitId/photos', allow(...CLINICAL), receivePhoto, uploadForm, async (req: Request, res) => {
    const { params, body } = parsed(req, uploadForm);
    const user = currentUser(req);
    const visit = await visits.findOneBy({ id: params.visitId });
    if (!visit) throw notFound('Visit');
    if (body.patientId && body.patientId !== visit.patientId) {
      throw conflict('This visit belongs to another patient. Open the right patient and visit, then upload again.', { field: 'patientId' }, 'VISIT_OF_ANOTHER_PATIENT');
    }
    if (visit.status === 'cancelled') throw conflict('This visit was cancelled; photos cannot be added to it.', undefined, 'VISIT_CANCELLED');
    const views = await viewsOf(db, visit.shotListId);
    if (!views.some((v) => v.key === body.view)) {
      throw badRequest(`"${body.view}" is not a view of this visit's shot list.`, { field: 'view', views: views.map((v) => v.key) }, 'UNKNOWN_VIEW');
    }
    if (!req.file) throw badRequest('Attach the photo in the form field "photo".', { field: 'photo' }, 'NO_FILE');
    const { photo, created } = await ingestPhoto(deps, { visit, viewKey: body.view, bytes: req.file.buffer, uploadedById: user.id, req });
    res.status(created ? 201 : 200).json(photoView(photo, { uploadedByName: created ? user.name : undefined }));
  });

  const visitList = validate({ params: visitParams, query: visitPhotosQuerySchema });
  r.get('/api/visits/:visitId/photos', allow(...CLINICAL), visitList, async (req, res) => {
    const { params, query } = parsed(req, visitList);
    const visit = await visits.findOneBy({ id: params.visitId });
    if (!visit) throw notFound('Visit');
    await auditPatientRead(db, req, { action: 'photo.list', patientId: visit.patientId, targetType: 'visit', targetId: visit.id });
    const rows = await photos.find({
      where: { visitId: params.visitId, ...(query.all === '1' ? {} : { state: 'captured' as const }) },
      relations: { uploadedBy: true },
      order: { uploadedAt: 'ASC' },
    });
    res.json(rows.map((p) => photoView(p)));
  });

  const patientList = validate({ params: idParams, query: visitPhotosQuerySchema });
  r.get('/api/patients/:id/photos', allow(...CLINICAL), patientList, async (req, res) => {
    const { params, query } = parsed(req, patientList);
    if (!(await db.getRepository(Patient).existsBy({ id: params.id }))) throw notFound('Patient');
    await auditPatientRead(db, req, { action: 'photo.list', patientId: params.id, targetType: 'patient', targetId: params.id });
    const rows = await photos.find({
      where: { patientId: params.id, ...(query.all === '1' ? {} : { state: 'captured' as const }) },
      relations: { uploadedBy: true, visit: true },
    });
    rows.sort((a, b) => (b.visit?.startsAt ?? '').localeCompare(a.visit?.startsAt ?? '') || a.uploadedAt.localeCompare(b.uploadedAt));
    res.json(rows.map((p) => photoView(p, { visitStartsAt: p.visit?.startsAt })));
  });

  const one = validate({ params: idParams });
  r.get('/api/photos/:id', allow(...CLINICAL), one, async (req, res) => {
    const { params } = parsed(req, one);
    const photo = await photos.findOne({ where: { id: params.id }, relations: { uploadedBy: true, visit: true } });
    if (!photo) throw notFound('Photo');
    await auditPatientRead(db, req, { action: 'photo.metadata.view', patientId: photo.patientId, targetType: 'photo', targetId: photo.id });
    res.json(photoView(photo, { visitStartsAt: photo.visit?.startsAt }));
  });

  const file = validate({ params: idParams, query: photoFileQuerySchema });
  r.get('/api/photos/:id/file', allow(...CLINICAL), file, async (req, res) => {
    const { params, query } = parsed(req, file);
    const photo = await photos.findOneBy({ id: params.id });
    if (!photo) throw notFound('Photo');
    const format = query.format ?? (query.variant === 'master' ? 'jpeg' : 'webp');
    const stored = photo.variants.find((v) => v.variant === query.variant && v.format === format);
    if (!stored) {
      throw badRequest(`This photo has no ${query.variant} in ${format}.`, { available: photo.variants.map((v) => `${v.variant}/${v.format}`) }, 'NO_SUCH_VARIANT');
    }
    const object = await storage.stream(stored.key);
    // Logged once the object is in hand, so a storage failure logs no view. Thumbnails fill every grid: they are
    // covered by the screen's entry (auditPatientRead), so they do not bury the views of full-size photos.
    const read = { action: query.variant === 'thumb' ? 'photo.thumbnail.view' : 'photo.view', patientId: photo.patientId, targetType: 'photo', targetId: photo.id, details: { variant: query.variant, format } };
    await (query.variant === 'thumb' ? auditPatientRead(db, req, read) : audit(db, req, read)).catch((err: unknown) => {
      object.body.destroy();
      throw err;
    });
    const ext = format === 'jpeg' ? 'jpg' : format;
    res.set({
      'Content-Type': format === 'jpeg' ? 'image/jpeg' : 'image/webp',
      // Each variant's bytes never change (a retake is a new photo), but the answer needs a signed-in clinician.
      'Cache-Control': 'private, max-age=31536000, immutable',
      ETag: `"${photo.id}-${query.variant}-${format}${stored.rev ? `-${stored.rev}` : ''}"`,
      'Content-Disposition': `inline; filename="${fileName(photo, ext, query.variant)}"`,
      ...(object.contentLength !== undefined ? { 'Content-Length': String(object.contentLength) } : {}),
    });
    if (req.fresh) {
      object.body.destroy();
      res.status(304).end();
      return;
    }
    await pipeline(object.body, res).catch((err: NodeJS.ErrnoException) => {
      // The browser dropped the download (navigated away, a newer image replaced it): nothing to report.
      if (err.code !== 'ERR_STREAM_PREMATURE_CLOSE') throw err;
    });
  });

  registerShotListRoutes(r, deps);
}
