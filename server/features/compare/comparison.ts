/**
 * A comparison of photos of one view: the per-photo and pair warnings, the measurements with their change and the
 * landmark overlay, all from what the alignment step stored on each photo. Nothing is measured or aligned again here:
 * the pure functions of server/media turn the stored pose, quality and measurements into plain words.
 */
import { In, type DataSource } from 'typeorm';
import { Patient } from '../../entities/patient.js';
import { Photo } from '../../entities/photo.js';
import { ShotListView } from '../../entities/shot-list.js';
import { Visit } from '../../entities/visit.js';
import { badRequest, notFound } from '../../lib/errors.js';
import { MEASUREMENT_CAUTION, ratioTargetView, type StoredLandmarks, type XY } from '../landmarks/landmarks.schemas.js';
import { changeSince, type LipMeasurements, type MeasurementChange } from '../../media/measurements.js';
import { poseWarnings } from '../../media/pose.js';
import { qualityWarnings } from '../../media/quality.js';
import { applyAffine } from '../../media/umeyama.js';
import { resolveView, type AnchorKind, type ViewDef } from '../../media/views.js';

export interface Warning {
  code: string;
  message: string;
}

/** Landmarks in the pixels of the image they are drawn on. */
export interface OverlayPoints {
  width: number;
  height: number;
  points: (XY | null)[] | null;
  anchors: XY[] | null;
}

export interface ComparedPhoto {
  photoId: string;
  visitId: string;
  visitStartsAt: string;
  visitKind: Visit['kind'];
  alignmentState: Photo['alignmentState'];
  alignmentNote: string | null;
  landmarksSource: StoredLandmarks['source'] | null;
  /** Warnings about this photo on its own: pose against its view, focus, exposure. */
  warnings: Warning[];
  measurements: LipMeasurements | null;
  overlay: { display: OverlayPoints | null; aligned: OverlayPoints | null };
}

export interface PairComparison {
  view: { key: string; label: string; measured: boolean };
  baseline: ComparedPhoto;
  followUp: ComparedPhoto;
  /** Differences between the two photos that make them harder to compare (pose, distance, sharpness, colour). */
  pairWarnings: Warning[];
  /** False when the two photos should not be read side by side as they are; `reasons` says why in plain words. */
  comparable: boolean;
  reasons: string[];
  change: MeasurementChange | null;
  target: ReturnType<typeof ratioTargetView>;
  caution: string;
}

/** The alignment definition of a view as the visit's shot list defines it. */
async function viewFor(db: DataSource, photo: Photo, visit: Visit): Promise<ViewDef> {
  const row = await db.getRepository(ShotListView).findOneBy({ shotListId: visit.shotListId, key: photo.viewKey });
  return resolveView(photo.viewKey, (row?.anchorKind ?? 'face') as AnchorKind, row?.label);
}

function overlayOf(p: Photo): ComparedPhoto['overlay'] {
  const lm = p.landmarks;
  if (!lm) return { display: null, aligned: null };
  const display: OverlayPoints = { width: lm.imageWidth, height: lm.imageHeight, points: lm.points, anchors: lm.anchors };
  const a = p.alignment;
  const map = (q: XY): XY => {
    const [x, y] = applyAffine(a!.matrix, q);
    return [x, y];
  };
  const aligned: OverlayPoints | null = a
    ? { width: a.frame.width, height: a.frame.height, points: lm.points ? lm.points.map((q) => (q ? map(q) : null)) : null, anchors: lm.anchors ? lm.anchors.map(map) : null }
    : null;
  return { display, aligned };
}

const PAIR_POSE = new Set(['yaw-baseline', 'pitch-baseline', 'scale-baseline']);
const PAIR_QUALITY = new Set(['blur-partner', 'colour-partner']);

/**
 * Loads photos of one patient and one view, oldest visit first. Refuses (400) photos of another patient or of
 * another view, or a photo that does not exist, so a comparison never mixes views or people.
 */
export async function loadViewPhotos(db: DataSource, patientId: string, photoIds: string[]): Promise<{ patient: Patient; photos: Photo[]; visits: Map<string, Visit>; view: ViewDef }> {
  // The target ratio is clinical and not selected by default (the front desk reads patient rows too).
  const patient = await db
    .getRepository(Patient)
    .createQueryBuilder('p')
    .addSelect('p.lipRatioTarget')
    .where('p.id = :id', { id: patientId })
    .getOne();
  if (!patient) throw notFound('Patient');
  const photos = await db.getRepository(Photo).findBy({ id: In(photoIds) });
  for (const id of photoIds) {
    const p = photos.find((x) => x.id === id);
    if (!p || p.patientId !== patientId) throw badRequest("A chosen photo is not one of this patient's photos.", { field: 'photoIds', id }, 'PHOTO_OF_ANOTHER_PATIENT');
  }
  const viewKeys = new Set(photos.map((p) => p.viewKey));
  if (viewKeys.size > 1) throw badRequest('A comparison pairs photos of one view only.', { field: 'photoIds', views: [...viewKeys] }, 'VIEW_MISMATCH');
  const visits = new Map((await db.getRepository(Visit).findBy({ id: In(photos.map((p) => p.visitId)) })).map((v) => [v.id, v]));
  photos.sort((a, b) => visits.get(a.visitId)!.startsAt.localeCompare(visits.get(b.visitId)!.startsAt) || a.capturedAt.localeCompare(b.capturedAt));
  const view = await viewFor(db, photos[0], visits.get(photos[0].visitId)!);
  return { patient, photos, visits, view };
}

export function comparedPhoto(p: Photo, visit: Visit, view: ViewDef): ComparedPhoto {
  return {
    photoId: p.id,
    visitId: p.visitId,
    visitStartsAt: visit.startsAt,
    visitKind: visit.kind,
    alignmentState: p.alignmentState,
    alignmentNote: p.alignmentNote,
    landmarksSource: p.landmarks?.source ?? null,
    warnings: [...(p.pose ? poseWarnings(view, p.pose) : []), ...(p.quality ? qualityWarnings(p.quality) : [])],
    measurements: view.measured ? p.measurements : null,
    overlay: overlayOf(p),
  };
}

/** The comparison of a baseline and a follow-up photo of one view, as chosen (not necessarily in time order). */
export async function comparePair(db: DataSource, patientId: string, baselineId: string, followUpId: string): Promise<PairComparison> {
  if (baselineId === followUpId) throw badRequest('Choose two different photos to compare.', { field: 'followUp' }, 'SAME_PHOTO');
  const { patient, photos, visits, view } = await loadViewPhotos(db, patientId, [baselineId, followUpId]);
  const base = photos.find((p) => p.id === baselineId)!;
  const follow = photos.find((p) => p.id === followUpId)!;
  const pairWarnings: Warning[] = [
    ...(follow.pose && base.pose ? poseWarnings(view, follow.pose, base.pose).filter((w) => PAIR_POSE.has(w.code)) : []),
    ...(follow.quality && base.quality ? qualityWarnings(follow.quality, base.quality).filter((w) => PAIR_QUALITY.has(w.code)) : []),
  ];
  const reasons: string[] = [];
  for (const [role, p] of [['baseline', base], ['follow-up', follow]] as const) {
    if (p.alignmentState === 'aligning') reasons.push(`The ${role} photo is still being aligned; it is shown as taken.`);
    if (p.alignmentState === 'needs-landmarks') reasons.push(`The ${role} photo could not be aligned automatically (landmarks must be placed by hand); it is shown as taken, not in the standard frame.`);
  }
  reasons.push(...pairWarnings.map((w) => w.message));
  const bm = view.measured ? base.measurements : null;
  const fm = view.measured ? follow.measurements : null;
  return {
    view: { key: view.key, label: view.label, measured: view.measured },
    baseline: comparedPhoto(base, visits.get(base.visitId)!, view),
    followUp: comparedPhoto(follow, visits.get(follow.visitId)!, view),
    pairWarnings,
    comparable: reasons.length === 0,
    reasons,
    change: bm && fm ? changeSince(fm, bm) : null,
    target: ratioTargetView(patient.lipRatioTarget ?? null),
    caution: MEASUREMENT_CAUTION,
  };
}
