import type { Request } from 'express';
import { In, type DataSource } from 'typeorm';
import { Photo } from '../../entities/photo.js';
import { Reminder } from '../../entities/reminder.js';
import { ShotListView } from '../../entities/shot-list.js';
import { Treatment, TreatmentLine } from '../../entities/treatment.js';
import { Visit } from '../../entities/visit.js';
import { openItemsForVisit, type OpenItem as ConsentOpenItem } from '../consents/open-items.js';

/** What the record still lacks besides the forms: views, lot numbers, the treatment itself, a review. */
export interface RecordOpenItem {
  type: 'views-missing' | 'lot-missing' | 'treatment-missing' | 'review-overdue';
  message: string;
  count?: number;
  /** The treatment visit whose review is overdue (for `review-overdue`). */
  treatmentVisitId?: string;
  dueOn?: string;
}

export type OpenItem = ConsentOpenItem | RecordOpenItem;

export interface VisitOpenItems {
  visitId: string;
  ready: boolean;
  items: OpenItem[];
}

/** A visit that has begun (or ended) is expected to have its photos; a booked one has not started yet. */
const started = (v: Visit) => v.status === 'in-progress' || v.status === 'completed';

/** How long after its due day a review counts as overdue when no later visit is booked. */
export const REVIEW_GRACE_DAYS = 7;
/** Treatments older than this are not chased for a missing review any more. */
const REVIEW_LOOKBACK_DAYS = 120;

/**
 * Open items of the given visits: the consent records' own (unsigned, withdrawn or outdated forms, unreviewed
 * screening flags) plus what the record lacks. Messages carry no clinical detail, so the front desk may see them.
 */
export async function openItemsForVisits(db: DataSource, req: Request, visits: Visit[], today: string): Promise<VisitOpenItems[]> {
  const live = visits.filter((v) => v.status !== 'cancelled');
  if (!live.length) return [];
  const visitIds = live.map((v) => v.id);
  const patientIds = [...new Set(live.map((v) => v.patientId))];
  const [views, photos, treatments, reviews, patientVisits] = await Promise.all([
    db.getRepository(ShotListView).findBy({ shotListId: In([...new Set(live.map((v) => v.shotListId))]) }),
    db.getRepository(Photo).find({ where: { visitId: In(visitIds), state: 'captured' }, select: { id: true, visitId: true, viewKey: true } }),
    db.getRepository(Treatment).findBy({ visitId: In(visitIds) }),
    db.getRepository(Reminder).find({ where: { patientId: In(patientIds), kind: 'review' }, order: { dueOn: 'ASC' } }),
    db.getRepository(Visit).find({ where: { patientId: In(patientIds) }, select: { id: true, patientId: true, startsAt: true, status: true } }),
  ]);
  const lines = treatments.length ? await db.getRepository(TreatmentLine).find({ where: { treatmentId: In(treatments.map((t) => t.id)) }, select: { id: true, treatmentId: true, lotNumber: true } }) : [];
  const reviewTreatments = reviews.length ? await db.getRepository(Treatment).find({ where: { id: In(reviews.map((r) => r.treatmentId)) }, select: { id: true, visitId: true, treatedAt: true } }) : [];

  const out: VisitOpenItems[] = [];
  for (const visit of live) {
    const items: OpenItem[] = [...(await openItemsForVisit(db, req, visit))];

    if (started(visit)) {
      const keys = views.filter((x) => x.shotListId === visit.shotListId).map((x) => x.key);
      const taken = new Set(photos.filter((p) => p.visitId === visit.id).map((p) => p.viewKey));
      const missing = keys.filter((k) => !taken.has(k)).length;
      if (missing) items.push({ type: 'views-missing', count: missing, message: `${missing} of ${keys.length} views not taken yet.` });
    }

    const treatment = treatments.find((t) => t.visitId === visit.id);
    if (treatment) {
      const noLot = lines.filter((l) => l.treatmentId === treatment.id && !l.lotNumber).length;
      if (noLot) items.push({ type: 'lot-missing', count: noLot, message: `${noLot} product ${noLot === 1 ? 'line has' : 'lines have'} no lot number.` });
    } else if (visit.kind === 'treatment' && visit.status === 'completed') {
      items.push({ type: 'treatment-missing', message: 'No treatment recorded for this treatment visit.' });
    }

    // A review is overdue when its day (plus a grace week) has passed and the patient had no visit since the treatment.
    for (const r of reviews.filter((x) => x.patientId === visit.patientId)) {
      const t = reviewTreatments.find((x) => x.id === r.treatmentId);
      if (!t || t.visitId === visit.id) continue;
      const dueMs = Date.parse(`${r.dueOn}T00:00:00Z`);
      const todayMs = Date.parse(`${today}T00:00:00Z`);
      if (todayMs - dueMs <= REVIEW_GRACE_DAYS * 86_400_000 || todayMs - Date.parse(t.treatedAt) > REVIEW_LOOKBACK_DAYS * 86_400_000) continue;
      const seenSince = patientVisits.some((v) => v.patientId === visit.patientId && v.id !== t.visitId && v.id !== visit.id && v.status !== 'cancelled' && v.startsAt > t.treatedAt);
      if (seenSince) continue;
      items.push({ type: 'review-overdue', treatmentVisitId: t.visitId, dueOn: r.dueOn, message: `The review after the treatment on ${t.treatedAt.slice(0, 10)} was due on ${r.dueOn}.` });
    }
    out.push({ visitId: visit.id, ready: items.length === 0, items });
  }
  return out;
}

export interface OverdueReview {
  patient: { id: string; code: string; firstName: string; lastName: string; phone: string | null };
  treatmentVisitId: string;
  treatedOn: string;
  dueOn: string;
}

/**
 * Patients whose review is overdue on `today` with no visit since their treatment (booked or held), for the front
 * desk to call. Treatments older than the look-back are left out.
 */
export async function overdueReviews(db: DataSource, today: string): Promise<OverdueReview[]> {
  const todayMs = Date.parse(`${today}T00:00:00Z`);
  const lastDue = new Date(todayMs - (REVIEW_GRACE_DAYS + 1) * 86_400_000).toISOString().slice(0, 10);
  const firstDue = new Date(todayMs - REVIEW_LOOKBACK_DAYS * 86_400_000).toISOString().slice(0, 10);
  const rows = await db
    .getRepository(Reminder)
    .createQueryBuilder('r')
    .innerJoin(Treatment, 't', 't.id = r.treatmentId')
    .innerJoin('patient', 'p', 'p.id = r.patientId')
    .select(['r.dueOn AS dueOn', 't.visitId AS visitId', 't.treatedOn AS treatedOn', 't.treatedAt AS treatedAt'])
    .addSelect(['p.id AS pid', 'p.code AS code', 'p.firstName AS firstName', 'p.lastName AS lastName', 'p.phone AS phone'])
    .where(`r.kind = 'review' AND r.dueOn <= :lastDue AND r.dueOn >= :firstDue AND p.archived = 0`, { lastDue, firstDue })
    .andWhere(
      `NOT EXISTS (SELECT 1 FROM "visit" v WHERE v."patientId" = r."patientId" AND v."id" <> t."visitId" AND v."status" <> 'cancelled' AND v."startsAt" > t."treatedAt")`,
    )
    .orderBy('r.dueOn', 'ASC')
    .getRawMany<{ dueOn: string; visitId: string; treatedOn: string; pid: string; code: string; firstName: string; lastName: string; phone: string | null }>();
  return rows.map((r) => ({
    patient: { id: r.pid, code: r.code, firstName: r.firstName, lastName: r.lastName, phone: r.phone },
    treatmentVisitId: r.visitId,
    treatedOn: r.treatedOn,
    dueOn: r.dueOn,
  }));
}
