import { In, type DataSource } from 'typeorm';
import { Photo } from '../../entities/photo.js';
import { ShotListView } from '../../entities/shot-list.js';
import { Treatment } from '../../entities/treatment.js';
import { Visit } from '../../entities/visit.js';
import { DEFAULT_SHOT_LIST_ID } from '../../entities/shot-list.js';
import { photoView } from '../photos/photos.routes.js';
import { treatmentTotals } from '../treatments/totals.js';

/** The sizes a screen draws, in WebP (the one format every supported browser shows). */
const SCREEN_VARIANTS = ['thumb', 'display', 'aligned'];

/**
 * A photo as the timeline, compare and review screens draw it: its thumbnail, display and aligned images and whether
 * it is aligned yet. The rest of a photo (hashes, uploader, capture details) is on `GET /api/photos/:id`.
 */
export interface TimelinePhoto {
  id: string;
  viewKey: string;
  alignmentState: Photo['alignmentState'];
  variants: { variant: string; format: 'webp'; width: number; height: number; url: string }[];
}

export interface TimelineVisit {
  id: string;
  startsAt: string;
  kind: Visit['kind'];
  status: Visit['status'];
  practitionerName: string | null;
  /** What was injected, as totals only (no notes, lots or techniques); null when no treatment was recorded. */
  treatment: { fillerMl: number; toxinU: number; products: string[] } | null;
  /** The current photo of each view taken at this visit, by view key; a missing key is a gap. */
  photos: Record<string, TimelinePhoto>;
}

export interface Timeline {
  patientId: string;
  /** Every view of the shot lists used, in shot-list order (the built-in list first). */
  views: { key: string; label: string }[];
  /** Visits that took place or have photos, oldest first; cancelled visits are left out. */
  visits: TimelineVisit[];
}

function screenPhoto(p: Photo): TimelinePhoto {
  const variants = photoView(p)
    .variants.filter((v) => v.format === 'webp' && SCREEN_VARIANTS.includes(v.variant))
    .map((v) => ({ variant: v.variant, format: 'webp' as const, width: v.width, height: v.height, url: v.url }));
  return { id: p.id, viewKey: p.viewKey, alignmentState: p.alignmentState, variants };
}

/**
 * One patient's visits in time order with the photo of each view and a treatment summary: what the timeline, compare
 * and review screens are built from. Staff notes are never part of it, so review mode can show it to the patient.
 */
export async function loadTimeline(db: DataSource, patientId: string, now = new Date()): Promise<Timeline> {
  const [visits, photos, treatments] = await Promise.all([
    db.getRepository(Visit).find({ where: { patientId }, relations: { practitioner: true }, order: { startsAt: 'ASC' } }),
    // Only the columns the screens draw from: the landmark, quality and measurement columns are most of a row.
    db.getRepository(Photo).find({ where: { patientId, state: 'captured' }, select: { id: true, visitId: true, viewKey: true, alignmentState: true, variants: true } }),
    db.getRepository(Treatment).find({ where: { patientId }, relations: { lines: { doses: true } } }),
  ]);
  const byVisit = new Map<string, Photo[]>();
  for (const p of photos) byVisit.set(p.visitId, [...(byVisit.get(p.visitId) ?? []), p]);
  const nowIso = now.toISOString();
  const shown = visits.filter((v) => v.status !== 'cancelled' && (v.startsAt <= nowIso || byVisit.has(v.id)));

  const listIds = [...new Set([DEFAULT_SHOT_LIST_ID, ...shown.map((v) => v.shotListId)])];
  const listViews = await db.getRepository(ShotListView).find({ where: { shotListId: In(listIds) }, order: { position: 'ASC' } });
  const views: Timeline['views'] = [];
  const used = new Set(photos.map((p) => p.viewKey));
  for (const id of listIds) {
    for (const v of listViews.filter((x) => x.shotListId === id)) {
      // Views of the built-in list always show (as gaps); other lists' views only when photographed or in use.
      if (views.some((x) => x.key === v.key)) continue;
      if (id === DEFAULT_SHOT_LIST_ID || used.has(v.key) || shown.some((s) => s.shotListId === id)) views.push({ key: v.key, label: v.label });
    }
  }
  for (const key of used) if (!views.some((v) => v.key === key)) views.push({ key, label: key });

  return {
    patientId,
    views,
    visits: shown.map((v) => {
      const t = treatments.find((x) => x.visitId === v.id);
      const totals = t ? treatmentTotals((t.lines ?? []).map((l) => ({ kind: l.kind, doses: l.doses ?? [] }))) : null;
      return {
        id: v.id,
        startsAt: v.startsAt,
        kind: v.kind,
        status: v.status,
        practitionerName: v.practitioner?.name ?? null,
        treatment: t && totals ? { fillerMl: totals.fillerMl, toxinU: totals.toxinU, products: [...new Set((t.lines ?? []).map((l) => l.productName))] } : null,
        photos: Object.fromEntries((byVisit.get(v.id) ?? []).map((p) => [p.viewKey, screenPhoto(p)])),
      };
    }),
  };
}
