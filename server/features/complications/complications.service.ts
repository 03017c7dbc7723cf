import { In, type DataSource, type EntityManager } from 'typeorm';
import { ComplicationAction, ComplicationEpisode, ComplicationFollowUp } from '../../entities/complication.js';
import { Photo } from '../../entities/photo.js';
import { Visit } from '../../entities/visit.js';
import type { ActionKind, ComplicationSign, Outcome } from './complications.schemas.js';

export interface ActionView {
  id: string;
  at: string;
  kind: ActionKind;
  description: string;
  productId: string | null;
  productName: string | null;
  unitLabel: string | null;
  lotNumber: string | null;
  expiryDate: string | null;
  amount: number | null;
  recordedBy: string | null;
  recordedAt: string;
}

export interface PhotoPair {
  viewKey: string;
  /** The treatment visit's photo of the view: the baseline. */
  baseline: { id: string; capturedAt: string } | null;
  photo: { id: string; capturedAt: string };
}

export interface FollowUpView {
  id: string;
  at: string;
  notes: string;
  visitId: string | null;
  visitStatus: string | null;
  /** The follow-up visit's photos, each with the baseline of its view. */
  photos: PhotoPair[];
}

export interface EpisodeView {
  id: string;
  patientId: string;
  treatmentId: string;
  visitId: string;
  startedAt: string;
  startedBy: string | null;
  onsetAt: string;
  signs: ComplicationSign[];
  signsNotes: string;
  outcome: Outcome | null;
  outcomeNotes: string;
  outcomeAt: string | null;
  updatedAt: string;
  actions: ActionView[];
  followUps: FollowUpView[];
}

export async function loadEpisode(db: DataSource | EntityManager, id: string): Promise<ComplicationEpisode | null> {
  return db.getRepository(ComplicationEpisode).findOne({
    where: { id },
    relations: { actions: { recordedBy: true }, followUps: true, startedBy: true },
    order: { actions: { at: 'ASC' }, followUps: { at: 'ASC' } },
  });
}

export function actionView(a: ComplicationAction): ActionView {
  return {
    id: a.id,
    at: a.at,
    kind: a.kind,
    description: a.description,
    productId: a.productId,
    productName: a.productName,
    unitLabel: a.unitLabel,
    lotNumber: a.lotNumber,
    expiryDate: a.expiryDate,
    amount: a.amountMilli === null ? null : a.amountMilli / 1000,
    recordedBy: a.recordedBy?.name ?? null,
    recordedAt: a.recordedAt,
  };
}

/**
 * The episode with its timeline and photos. Each photo of a follow-up visit is paired with the treatment visit's
 * photo of the same view (the baseline taken before treatment), so a change can be judged side by side.
 */
export async function episodeView(db: DataSource | EntityManager, e: ComplicationEpisode): Promise<EpisodeView> {
  const followUps = (e.followUps ?? []) as ComplicationFollowUp[];
  const visitIds = [e.visitId, ...followUps.map((f) => f.visitId).filter((v): v is string => !!v)];
  const photos = await db.getRepository(Photo).find({ where: { visitId: In(visitIds), state: 'captured' }, order: { capturedAt: 'ASC' } });
  const visits = await db.getRepository(Visit).findBy({ id: In(visitIds) });
  const baseline = new Map(photos.filter((p) => p.visitId === e.visitId).map((p) => [p.viewKey, { id: p.id, capturedAt: p.capturedAt }]));
  return {
    id: e.id,
    patientId: e.patientId,
    treatmentId: e.treatmentId,
    visitId: e.visitId,
    startedAt: e.startedAt,
    startedBy: e.startedBy?.name ?? null,
    onsetAt: e.onsetAt,
    signs: JSON.parse(e.signs),
    signsNotes: e.signsNotes,
    outcome: e.outcome,
    outcomeNotes: e.outcomeNotes,
    outcomeAt: e.outcomeAt,
    updatedAt: e.updatedAt,
    actions: (e.actions ?? []).map(actionView),
    followUps: followUps.map((f) => ({
      id: f.id,
      at: f.at,
      notes: f.notes,
      visitId: f.visitId,
      visitStatus: visits.find((v) => v.id === f.visitId)?.status ?? null,
      photos: photos.filter((p) => f.visitId && p.visitId === f.visitId).map((p) => ({ viewKey: p.viewKey, baseline: baseline.get(p.viewKey) ?? null, photo: { id: p.id, capturedAt: p.capturedAt } })),
    })),
  };
}
