/**
 * One alignment run for one photo: automatic landmarks when none are stored, the aligned photo, pose, capture quality
 * and lip measurements. Used by the alignment worker only, so runs never overlap within one process.
 */
import type { DataSource, EntityManager } from 'typeorm';
import { Photo, type PhotoVariant } from '../../entities/photo.js';
import { ShotListView } from '../../entities/shot-list.js';
import { Visit } from '../../entities/visit.js';
import { nowIso } from '../../lib/time.js';
import { alignPhoto, viewTransform } from '../../media/align.js';
import type { PipelineDeps } from '../../media/after-store.js';
import { checkLandmarks } from '../../media/landmark-input.js';
import { detectLandmarks } from '../../media/landmarks.js';
import { LIP_POINTS, measureLips, rulerScale, type LipMeasurements } from '../../media/measurements.js';
import { estimatePose } from '../../media/pose.js';
import { assessQuality, pointsBox, skinPatches } from '../../media/quality.js';
import { refineAgainst } from '../../media/refine.js';
import { applyAffine, type Point, type Similarity } from '../../media/umeyama.js';
import { fitPoints, resolveView, type AnchorKind, type ViewDef } from '../../media/views.js';
import { photoKey } from '../../storage/keys.js';
import type { RegistrationNote, StoredAlignment, StoredLandmarks, StoredQuality, XY } from './landmarks.schemas.js';

/** The alignment definition of a photo's view, from the shot list of its visit. */
export async function viewOfPhoto(db: DataSource | EntityManager, photo: Pick<Photo, 'visitId' | 'viewKey'>): Promise<ViewDef> {
  const visit = await db.getRepository(Visit).findOneBy({ id: photo.visitId });
  const row = visit ? await db.getRepository(ShotListView).findOneBy({ shotListId: visit.shotListId, key: photo.viewKey }) : null;
  return resolveView(photo.viewKey, (row?.anchorKind ?? 'face') as AnchorKind, row?.label);
}

/** The display variant: the coordinate space of a photo's landmarks and the source of its aligned photo. */
export function displayVariant(photo: Photo): PhotoVariant | undefined {
  return photo.variants.find((v) => v.variant === 'display' && v.format === 'jpeg') ?? photo.variants.find((v) => v.variant === 'display');
}

export function alignedVariants(photo: Photo): PhotoVariant[] {
  return photo.variants.filter((v) => (v.variant as string) === 'aligned');
}

function anchorList(view: ViewDef): string {
  return view.anchors.map((a) => a.label.charAt(0).toLowerCase() + a.label.slice(1)).join('; ');
}

/** Lip measurements when the view is measured and the lip points are all placed; otherwise null. */
export function measurementsOf(view: ViewDef, lm: StoredLandmarks | null): LipMeasurements | null {
  const points = lm?.points;
  if (!view.measured || !points || points.length !== 68 || !LIP_POINTS.every((i) => points[i])) return null;
  try {
    const scale = lm.ruler ? rulerScale(lm.ruler.a, lm.ruler.b, lm.ruler.lengthMm) : null;
    return measureLips(points, { scale });
  } catch {
    return null;
  }
}

const clampPoint = (p: Point, w: number, h: number): XY => [Math.min(w, Math.max(0, p[0])), Math.min(h, Math.max(0, p[1]))];

/** Registers a photo to a reference photo's aligned frame over the view's stable region (refine.ts). */
async function registerTo(deps: PipelineDeps, view: ViewDef, bytes: Buffer, fitted: Similarity, reference: Photo): Promise<{ transform: Similarity; note: RegistrationNote } | null> {
  const frame = alignedVariants(reference).find((v) => v.format === 'jpeg');
  if (!frame || !reference.alignment) return null;
  const r = await refineAgainst(await deps.storage.get(frame.key), view.stableRegion, bytes, fitted);
  return {
    transform: r.transform,
    note: { photoId: reference.id, rev: reference.alignment.rev, rhoBefore: r.rhoBefore, rhoAfter: r.rhoAfter, shiftPx: r.shiftPx, accepted: r.accepted },
  };
}

const byVisitOrder = (a: Photo, b: Photo) => (a.visit?.startsAt ?? '').localeCompare(b.visit?.startsAt ?? '') || a.capturedAt.localeCompare(b.capturedAt);

/** The captured photos of one patient's view, in visit order (the first aligned one is the view's baseline). */
async function photosOfView(db: DataSource, photo: Pick<Photo, 'patientId' | 'viewKey'>): Promise<Photo[]> {
  const rows = await db.getRepository(Photo).find({ where: { patientId: photo.patientId, viewKey: photo.viewKey, state: 'captured' }, relations: { visit: true } });
  return rows.sort(byVisitOrder);
}

/**
 * The photo a follow-up is registered to: the view's baseline (its first aligned photo in visit order), unless this
 * photo comes first, in which case it is the baseline and others are registered to it.
 */
function referenceOf(photo: Photo, ofView: Photo[]): Photo | null {
  for (const p of ofView) {
    if (p.id === photo.id) return null;
    if (p.alignmentState === 'aligned' && p.alignment) return p;
  }
  return null;
}

/**
 * Brings one photo from "aligning" to "aligned" or "needs-landmarks". Writes only if the photo's landmark revision is
 * still the one it started from, so a run overtaken by an edit leaves the newer state alone. Answers the photos that
 * must be registered again because this one became (or changed as) their baseline.
 */
export async function alignStoredPhoto(deps: PipelineDeps, photoId: string, displayBytes?: Buffer): Promise<string[]> {
  const { db, storage } = deps;
  const repo = db.getRepository(Photo);
  const photo = await repo.findOneBy({ id: photoId });
  if (!photo || photo.alignmentState !== 'aligning') return [];
  const rev = photo.landmarksRev;
  const view = await viewOfPhoto(db, photo);
  const display = displayVariant(photo);

  const save = async (patch: Partial<Photo>, keepAligned: boolean) => {
    const stale = keepAligned ? [] : alignedVariants(photo);
    const variants = keepAligned ? patch.variants ?? photo.variants : photo.variants.filter((v) => !stale.includes(v));
    const res = await repo.update({ id: photo.id, landmarksRev: rev }, { ...patch, variants, alignmentAttempts: 0 });
    if (res.affected && stale.length) await storage.remove(stale.map((v) => v.key));
  };
  const needsLandmarks = async (note: string, lm: StoredLandmarks | null) => {
    await save(
      {
        alignmentState: 'needs-landmarks',
        alignmentNote: note,
        landmarks: lm,
        alignment: null,
        pose: lm ? estimatePose(view, lm.points, lm.anchors) : null,
        quality: null,
        measurements: measurementsOf(view, lm),
      },
      false,
    );
    return [];
  };

  if (!display) return needsLandmarks('This photo has no display image to place landmarks on.', photo.landmarks);
  const bytes = displayBytes ?? (await storage.get(display.key));
  let lm = photo.landmarks;
  if (!lm) {
    if (view.kind === 'profile') {
      return needsLandmarks(`The face model does not work on this view. Place its anchors by hand: ${anchorList(view)}.`, null);
    }
    const found = await detectLandmarks(bytes);
    if (!found) return needsLandmarks(`No face was found automatically. Place the anchors by hand: ${anchorList(view)}.`, null);
    lm = {
      source: 'auto',
      // The model may put a jaw point a hair outside the picture; the photo's own edge is the honest limit.
      points: found.points.map((p) => clampPoint(p, display.width, display.height)),
      anchors: null,
      ruler: null,
      score: found.score,
      box: found.box,
      imageWidth: display.width,
      imageHeight: display.height,
      editedAt: null,
      editedById: null,
    };
  }

  const checked = checkLandmarks(lm, { width: lm.imageWidth, height: lm.imageHeight }, view);
  if (!checked.ok || !checked.value.anchors) {
    const why = checked.ok ? "The landmarks do not include this view's anchors" : checked.issues[0].message.replace(/\.$/, '');
    return needsLandmarks(`${why}. Place the anchors by hand: ${anchorList(view)}.`, lm);
  }
  const anchors = checked.value.anchors;
  const fit = fitPoints(view, lm.points, anchors);
  const fitted = viewTransform(fit);
  const ofView = await photosOfView(db, photo);
  const reference = referenceOf(photo, ofView);
  const refined = reference ? await registerTo(deps, view, bytes, fitted.transform, reference) : null;
  const aligned = await alignPhoto(bytes, view, refined?.transform ?? fitted.transform, fitted.residual, { formats: ['webp', 'jpeg'], raw: true });

  // A new revision every run, so a re-registered photo's aligned file is not served from a cache.
  const nextRev = Math.max(rev, photo.alignment?.rev ?? 0) + 1;
  const stored: PhotoVariant[] = aligned.encoded.map((e) => ({
    variant: 'aligned',
    format: e.format,
    key: photoKey({ patientId: photo.patientId, visitId: photo.visitId, photoId: photo.id, variant: 'aligned', ext: e.format === 'jpeg' ? 'jpg' : 'webp' }),
    width: aligned.width,
    height: aligned.height,
    bytes: e.data.length,
    rev: nextRev,
  }));
  await Promise.all(stored.map((v, i) => storage.put(v.key, aligned.encoded[i].data, v.format === 'jpeg' ? 'image/jpeg' : 'image/webp')));

  // Quality is judged in the frame, where partner photos share one geometry.
  const toFrame = (p: XY | null) => (p ? applyAffine(aligned.matrix, p) : null);
  const framePoints = lm.points ? lm.points.map(toFrame) : null;
  const region = pointsBox(framePoints ?? anchors.map((p) => applyAffine(aligned.matrix, p)), framePoints ? 0.05 : 0.5);
  const report = assessQuality(aligned.raw!, region, framePoints ? skinPatches(framePoints) : null);
  const quality: StoredQuality = { ...report, skinLab: report.skinLab ? [...report.skinLab] : null };
  const alignment: StoredAlignment = {
    rev: nextRev,
    viewKey: view.key,
    frame: { width: aligned.width, height: aligned.height },
    matrix: aligned.matrix,
    scale: aligned.transform.scale,
    angleDeg: (aligned.transform.angle * 180) / Math.PI,
    residual: aligned.residual,
    anchors: anchors.map((p) => [p[0], p[1]]),
    fit: fit.from,
    registeredTo: refined?.note ?? null,
    alignedAt: nowIso(),
  };
  await save(
    {
      alignmentState: 'aligned',
      alignmentNote: null,
      landmarks: lm,
      alignment,
      pose: estimatePose(view, lm.points, anchors),
      quality,
      measurements: measurementsOf(view, lm),
      variants: [...photo.variants.filter((v) => (v.variant as string) !== 'aligned'), ...stored],
    },
    true,
  );
  if (reference) return [];
  // This photo is the view's baseline: every other aligned photo of the view is registered to it, at this revision.
  const stale = ofView.filter((p) => p.id !== photo.id && p.alignmentState === 'aligned' && (p.alignment?.registeredTo?.photoId !== photo.id || p.alignment.registeredTo.rev !== nextRev));
  for (const p of stale) await repo.update({ id: p.id, landmarksRev: p.landmarksRev, alignmentState: 'aligned' }, { alignmentState: 'aligning' });
  return stale.map((p) => p.id);
}
