import sharp from 'sharp';
import type { Deps } from '../../deps.js';
import type { Photo } from '../../entities/photo.js';
import { badRequest } from '../../lib/errors.js';
import { ratioTargetView } from '../landmarks/landmarks.schemas.js';
import { nowIso } from '../../lib/time.js';
import type { ComparisonSheetInput } from './compare.schemas.js';
import { comparePair, loadViewPhotos } from './comparison.js';
import { renderComparisonSheet, type SheetPhoto } from './sheet-pdf.js';
import { signingIdentity, signPdf } from '../../signing/pdf-signing.js';

/** Long edge of the photos placed on the sheet: sharp at A4 width, small enough to e-mail. */
const SHEET_PHOTO_EDGE = 1100;

/** The JPEG the sheet embeds: the aligned photo when asked for and ready, else the display photo (never the master). */
async function sheetJpeg(deps: Deps, p: Photo, aligned: boolean): Promise<{ jpeg: Buffer; width: number; height: number; aligned: boolean }> {
  const pick = (variant: string) => p.variants.find((v) => (v.variant as string) === variant && v.format === 'jpeg');
  const v = (aligned && p.alignmentState === 'aligned' ? pick('aligned') : undefined) ?? pick('display');
  if (!v) throw badRequest('A chosen photo has no display image yet.', { field: 'photoIds', id: p.id }, 'NO_DISPLAY_IMAGE');
  const bytes = await deps.storage.get(v.key);
  const { data, info } = await sharp(bytes)
    .resize(SHEET_PHOTO_EDGE, SHEET_PHOTO_EDGE, { fit: 'inside', withoutEnlargement: true })
    .jpeg({ quality: 84 })
    .toBuffer({ resolveWithObject: true });
  return { jpeg: data, width: info.width, height: info.height, aligned: (v.variant as string) === 'aligned' };
}

export interface BuiltSheet {
  pdf: Buffer;
  fileName: string;
  patient: { id: string; firstName: string; lastName: string; email: string | null };
  viewKey: string;
  photoIds: string[];
}

/** Builds the comparison sheet of a pair or strip of one patient's photos of one view. */
export async function buildComparisonSheet(deps: Deps, patientId: string, input: ComparisonSheetInput & { aligned: boolean }): Promise<BuiltSheet> {
  const { patient, photos, visits, view } = await loadViewPhotos(deps.db, patientId, input.photoIds);
  if (view.key !== input.view) throw badRequest('The chosen photos are not of this view.', { field: 'view', view: view.key }, 'VIEW_MISMATCH');
  // A pair keeps the chosen order (baseline first); a strip goes oldest first.
  const ordered = input.layout === 'pair' ? input.photoIds.map((id) => photos.find((p) => p.id === id)!) : photos;
  const pair = input.layout === 'pair' ? await comparePair(deps.db, patientId, input.photoIds[0], input.photoIds[1]) : null;
  const sheetPhotos: SheetPhoto[] = [];
  for (const p of ordered) {
    const img = await sheetJpeg(deps, p, input.aligned);
    const visit = visits.get(p.visitId)!;
    sheetPhotos.push({ ...img, visitStartsAt: visit.startsAt, visitKind: visit.kind, measurements: view.measured ? p.measurements : null });
  }
  const notComparable = pair
    ? pair.reasons
    : ordered.filter((p) => p.alignmentState !== 'aligned').map((p) => `The photo of ${visits.get(p.visitId)!.startsAt.slice(0, 10)} is not aligned; it is shown as taken.`);
  const generatedAt = nowIso();
  const doc = await renderComparisonSheet({
    clinicName: deps.config.clinicName,
    timeZone: deps.config.clinicTimeZone,
    patient,
    viewLabel: view.label,
    layout: input.layout,
    photos: sheetPhotos,
    change: pair?.change ?? null,
    target: ratioTargetView(patient.lipRatioTarget ?? null),
    notComparable,
    generatedAt,
  });
  const pdf = await signPdf(doc, await signingIdentity(deps.db, deps.config), {
    reason: `Comparison sheet of ${patient.firstName} ${patient.lastName}, ${view.label}`,
    signingTime: new Date(generatedAt),
    contactInfo: deps.config.clinicName,
    location: deps.config.clinicName,
  });
  return {
    pdf,
    fileName: `comparison-${view.key}-${generatedAt.slice(0, 10)}.pdf`,
    patient: { id: patient.id, firstName: patient.firstName, lastName: patient.lastName, email: patient.email },
    viewKey: view.key,
    photoIds: ordered.map((p) => p.id),
  };
}
