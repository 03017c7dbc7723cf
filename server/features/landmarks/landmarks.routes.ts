import type { Request, Router } from 'express';
import { z } from 'zod';
import { allow, CLINICAL, currentUser } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Patient } from '../../entities/patient.js';
import { Photo } from '../../entities/photo.js';
import { audit, auditPatientRead } from '../../lib/audit.js';
import { badRequest, notFound } from '../../lib/errors.js';
import { nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { AFTER_PHOTO_STORED, type AfterPhotoStored } from '../../media/after-store.js';
import { checkLandmarks } from '../../media/landmark-input.js';
import { changeSince } from '../../media/measurements.js';
import { poseWarnings } from '../../media/pose.js';
import { qualityWarnings } from '../../media/quality.js';
import type { ViewDef } from '../../media/views.js';
import { alignmentWorkerFor } from './alignment-worker.js';
import { displayVariant, viewOfPhoto } from './alignment.service.js';
import {
  LIP_RATIO_PRESETS,
  lipRatioTargetSchema,
  MEASUREMENT_CAUTION,
  measurementsQuerySchema,
  pairsQuerySchema,
  putLandmarksSchema,
  ratioTargetView,
  type LandmarkViewDto,
  type LipRatioTargetDto,
  type MeasurementsDto,
  type PairsDto,
  type StoredLandmarks,
  type ViewSummaryDto,
} from './landmarks.schemas.js';

/** After a photo is stored: queue its alignment and return at once, so the upload is answered without waiting. */
const queueAlignment: AfterPhotoStored = async function queueAlignment(stored) {
  void alignmentWorkerFor(stored.deps).enqueue(stored.photo.id, stored.display.jpeg);
};
if (!AFTER_PHOTO_STORED.includes(queueAlignment)) AFTER_PHOTO_STORED.push(queueAlignment);

const idParams = z.object({ id: uuidParam });

const fileUrl = (photo: Photo, variant: string, format: string) => {
  const v = photo.variants.find((x) => (x.variant as string) === variant && x.format === format);
  return v ? `/api/photos/${photo.id}/file?variant=${variant}&format=${format}${v.rev ? `&rev=${v.rev}` : ''}` : null;
};

function viewSummary(view: ViewDef): ViewSummaryDto {
  return {
    key: view.key,
    label: view.label,
    kind: view.kind,
    measured: view.measured,
    frame: view.frame,
    anchors: view.anchors.map((a) => ({ key: a.key, label: a.label, from68: a.from68 })),
  };
}

/** Everything the landmark editor needs about one photo. */
function landmarkView(photo: Photo, view: ViewDef): LandmarkViewDto {
  const display = displayVariant(photo);
  return {
    photoId: photo.id,
    patientId: photo.patientId,
    visitId: photo.visitId,
    view: viewSummary(view),
    alignmentState: photo.alignmentState,
    alignmentNote: photo.alignmentNote,
    image: display ? { url: fileUrl(photo, 'display', display.format), width: display.width, height: display.height } : null,
    aligned: photo.alignment
      ? { url: fileUrl(photo, 'aligned', 'webp'), jpegUrl: fileUrl(photo, 'aligned', 'jpeg'), width: photo.alignment.frame.width, height: photo.alignment.frame.height, rev: photo.alignment.rev }
      : null,
    landmarks: photo.landmarks,
    alignment: photo.alignment,
    pose: photo.pose,
    quality: photo.quality,
    measurements: photo.measurements,
    warnings: [...(photo.pose ? poseWarnings(view, photo.pose) : []), ...(photo.quality ? qualityWarnings(photo.quality) : [])],
    caution: MEASUREMENT_CAUTION,
  };
}

async function loadPatientTarget(deps: Deps, id: string) {
  const row = await deps.db.getRepository(Patient).findOne({ where: { id }, select: { id: true, lipRatioTarget: true } });
  if (!row) throw notFound('Patient');
  return row.lipRatioTarget ?? null;
}

export function registerLandmarkRoutes(r: Router, deps: Deps): void {
  const { db } = deps;
  const photos = db.getRepository(Photo);
  const worker = alignmentWorkerFor(deps);
  // Photos left "aligning" by a restart (or written by the seed) are picked up again.
  worker.resume().catch((err: unknown) => deps.logger.warn({ err }, 'could not resume pending alignments'));

  const loadPhoto = async (id: string) => {
    const photo = await photos.findOneBy({ id });
    if (!photo) throw notFound('Photo');
    return photo;
  };

  const one = validate({ params: idParams });
  r.get('/api/photos/:id/landmarks', allow(...CLINICAL), one, async (req, res) => {
    const { params } = parsed(req, one);
    const photo = await loadPhoto(params.id);
    await auditPatientRead(db, req, { action: 'landmarks.view', patientId: photo.patientId, targetType: 'photo', targetId: photo.id });
    res.json(landmarkView(photo, await viewOfPhoto(db, photo)));
  });

  /** Marks new landmarks (or none, for a reset), then waits for the realignment so the editor sees the result. */
  async function relandmark(req: Request, photo: Photo, landmarks: StoredLandmarks | null, action: string) {
    await db.transaction(async (tx) => {
      await tx.getRepository(Photo).update(
        { id: photo.id },
        { landmarks, landmarksRev: photo.landmarksRev + 1, alignmentState: 'aligning', alignmentNote: null, alignmentAttempts: 0 },
      );
      await audit(tx, req, {
        action,
        patientId: photo.patientId,
        targetType: 'photo',
        targetId: photo.id,
        details: landmarks ? { points: landmarks.points ? landmarks.points.filter(Boolean).length : 0, anchors: landmarks.anchors?.length ?? 0, ruler: !!landmarks.ruler } : {},
      });
    });
    await worker.enqueue(photo.id, undefined, { urgent: true });
    const fresh = await loadPhoto(photo.id);
    return landmarkView(fresh, await viewOfPhoto(db, fresh));
  }

  const put = validate({ params: idParams, body: putLandmarksSchema });
  r.put('/api/photos/:id/landmarks', allow(...CLINICAL), put, async (req, res) => {
    const { params, body } = parsed(req, put);
    const photo = await loadPhoto(params.id);
    const view = await viewOfPhoto(db, photo);
    const display = displayVariant(photo);
    if (!display) throw badRequest('This photo has no display image to place landmarks on.', undefined, 'NO_DISPLAY_IMAGE');
    const checked = checkLandmarks(body, display, view);
    if (!checked.ok) throw badRequest('The landmarks are not valid.', { issues: checked.issues }, 'INVALID_LANDMARKS');
    const v = checked.value;
    const landmarks: StoredLandmarks = {
      source: 'manual',
      points: v.points ? v.points.map((p) => (p ? [p[0], p[1]] : null)) : null,
      anchors: v.anchorsFrom === 'placed' && v.anchors ? v.anchors.map((p) => [p[0], p[1]]) : null,
      ruler: v.ruler ? { a: [v.ruler.a[0], v.ruler.a[1]], b: [v.ruler.b[0], v.ruler.b[1]], lengthMm: v.ruler.lengthMm } : null,
      score: null,
      box: null,
      imageWidth: display.width,
      imageHeight: display.height,
      editedAt: nowIso(),
      editedById: currentUser(req).id,
    };
    res.json(await relandmark(req, photo, landmarks, 'photo.landmarks.edit'));
  });

  r.post('/api/photos/:id/landmarks/reset', allow(...CLINICAL), one, async (req, res) => {
    const { params } = parsed(req, one);
    const photo = await loadPhoto(params.id);
    res.json(await relandmark(req, photo, null, 'photo.landmarks.reset'));
  });

  const pairs = validate({ params: idParams, query: pairsQuerySchema });
  r.get('/api/patients/:id/pairs', allow(...CLINICAL), pairs, async (req, res) => {
    const { params, query } = parsed(req, pairs);
    await loadPatientTarget(deps, params.id);
    const rows = await photos.find({ where: { patientId: params.id, viewKey: query.view, state: 'captured' }, relations: { visit: true } });
    rows.sort((a, b) => (a.visit?.startsAt ?? '').localeCompare(b.visit?.startsAt ?? '') || a.capturedAt.localeCompare(b.capturedAt));
    const view = rows.length ? await viewOfPhoto(db, rows[0]) : null;
    // The first aligned photo is the reference the later ones are checked against.
    const baseline = rows.find((p) => p.alignmentState === 'aligned') ?? rows[0] ?? null;
    await audit(db, req, { action: 'photo.pairs.view', patientId: params.id, targetType: 'patient', targetId: params.id, details: { view: query.view, photos: rows.length } });
    const body: PairsDto = {
      view: view ? viewSummary(view) : { key: query.view },
      baselinePhotoId: baseline?.id ?? null,
      photos: rows.map((p) => {
        const isBaseline = p === baseline;
        const warnings = [
          ...(p.pose && view ? poseWarnings(view, p.pose, isBaseline ? null : baseline?.pose) : []),
          ...(p.quality ? qualityWarnings(p.quality, isBaseline ? null : baseline?.quality) : []),
        ];
        return {
          photoId: p.id,
          visitId: p.visitId,
          visitStartsAt: p.visit?.startsAt ?? null,
          visitKind: p.visit?.kind ?? null,
          capturedAt: p.capturedAt,
          isBaseline,
          alignmentState: p.alignmentState,
          alignmentNote: p.alignmentNote,
          landmarksSource: p.landmarks?.source ?? null,
          aligned: p.alignment
            ? { url: fileUrl(p, 'aligned', 'webp'), jpegUrl: fileUrl(p, 'aligned', 'jpeg'), width: p.alignment.frame.width, height: p.alignment.frame.height }
            : null,
          displayUrl: fileUrl(p, 'display', 'webp') ?? fileUrl(p, 'display', 'jpeg'),
          thumbUrl: fileUrl(p, 'thumb', 'webp') ?? fileUrl(p, 'thumb', 'jpeg'),
          pose: p.pose,
          warnings,
        };
      }),
    };
    res.json(body);
  });

  const measurements = validate({ params: idParams, query: measurementsQuerySchema });
  r.get('/api/patients/:id/measurements', allow(...CLINICAL), measurements, async (req, res) => {
    const { params, query } = parsed(req, measurements);
    const target = await loadPatientTarget(deps, params.id);
    const rows = (await photos.find({ where: { patientId: params.id, state: 'captured' }, relations: { visit: true } })).filter((p) => p.measurements);
    rows.sort((a, b) => (a.visit?.startsAt ?? '').localeCompare(b.visit?.startsAt ?? '') || a.capturedAt.localeCompare(b.capturedAt));
    const byView = new Map<string, Photo[]>();
    for (const p of rows) byView.set(p.viewKey, [...(byView.get(p.viewKey) ?? []), p]);
    const views: MeasurementsDto['views'] = [];
    for (const [viewKey, list] of byView) {
      const view = await viewOfPhoto(db, list[0]);
      const base = list.find((p) => p.visitId === query.baseline) ?? list[0];
      views.push({
        viewKey,
        label: view.label,
        baselinePhotoId: base.id,
        rows: list.map((p) => ({
          photoId: p.id,
          visitId: p.visitId,
          visitStartsAt: p.visit?.startsAt ?? null,
          visitKind: p.visit?.kind ?? null,
          capturedAt: p.capturedAt,
          isBaseline: p === base,
          alignmentState: p.alignmentState,
          landmarksSource: p.landmarks?.source ?? null,
          measurements: p.measurements!,
          change: p === base ? null : changeSince(p.measurements!, base.measurements!),
        })),
      });
    }
    await audit(db, req, { action: 'measurements.view', patientId: params.id, targetType: 'patient', targetId: params.id });
    const body: MeasurementsDto = { target: ratioTargetView(target), presets: LIP_RATIO_PRESETS, caution: MEASUREMENT_CAUTION, baselineVisitId: query.baseline ?? null, views };
    res.json(body);
  });

  const setTarget = validate({ params: idParams, body: lipRatioTargetSchema });
  r.patch('/api/patients/:id/lip-ratio-target', allow(...CLINICAL), setTarget, async (req, res) => {
    const { params, body } = parsed(req, setTarget);
    const before = await loadPatientTarget(deps, params.id);
    const value = body.target === 'none' ? null : body.target === 'custom' ? body.value! : LIP_RATIO_PRESETS.find((p) => p.key === body.target)!.value;
    await db.transaction(async (tx) => {
      await tx.getRepository(Patient).update({ id: params.id }, { lipRatioTarget: value, updatedAt: nowIso() });
      await audit(tx, req, { action: 'patient.lip-ratio-target', patientId: params.id, targetType: 'patient', targetId: params.id, details: { from: before, to: value } });
    });
    const answer: LipRatioTargetDto = { target: ratioTargetView(value), presets: LIP_RATIO_PRESETS, caution: MEASUREMENT_CAUTION };
    res.json(answer);
  });
}
