import { In, LessThanOrEqual } from 'typeorm';
import { Patient } from '../entities/patient.js';
import { Photo } from '../entities/photo.js';
import { Visit } from '../entities/visit.js';
import type { PipelineDeps } from '../media/after-store.js';
import { ingestPhoto } from '../media/ingest.js';
import { renderPortrait, type PortraitView } from '../media/synthetic-portrait.js';

/**
 * Which demo patients get photos, and the face each gets. The seeds draw invented faces that the automatic face
 * model finds in every frontal shot, so the demo's comparisons align by themselves.
 */
export const PHOTO_PATIENTS: { code: string; face: number; baseline: number }[] = [
  { code: 'LR-0001', face: 18, baseline: 0.12 },
  { code: 'LR-0002', face: 8, baseline: 0.2 },
  { code: 'LR-0003', face: 3, baseline: 0.08 },
];
/** Every photographed visit gets the four views that are compared and measured; the latest visit of the first patient gets all eight. */
const COMPARED_VIEWS: PortraitView[] = ['frontal-rest', 'frontal-smile', 'lips-rest', 'lips-pucker'];
const ALL_VIEWS: PortraitView[] = [...COMPARED_VIEWS, 'oblique-left', 'oblique-right', 'lateral-left', 'lateral-right'];
/** How much fuller the lips look after each treatment (0–1 scale of the drawing). */
const PER_TREATMENT = 0.3;

interface Job {
  visit: Visit;
  view: PortraitView;
  lipVolume: number;
  face: number;
  shot: number;
  capturedAt: string;
}

/**
 * Gives the demo clinic's first patients photos for their past visits, through the same pipeline as an upload
 * (so the stored files, hashes, access log and the steps after storing are all real). Runs once: it does nothing
 * when any photo exists or the demo patients are missing; `stopped` ends it early (server shutting down).
 * Returns the number of photos stored.
 */
export async function seedDemoPhotos(deps: PipelineDeps, opts: { now?: Date; stopped?: () => boolean } = {}): Promise<number> {
  const now = opts.now ?? new Date();
  const { db } = deps;
  if ((await db.getRepository(Photo).count()) > 0) return 0;
  const patients = await db.getRepository(Patient).findBy({ code: In(PHOTO_PATIENTS.map((p) => p.code)) });
  const jobs: Job[] = [];
  for (const [pi, plan] of PHOTO_PATIENTS.entries()) {
    const patient = patients.find((p) => p.code === plan.code);
    if (!patient) continue;
    const visits = await db.getRepository(Visit).find({
      where: { patientId: patient.id, startsAt: LessThanOrEqual(now.toISOString()), status: In(['completed', 'in-progress']) },
      order: { startsAt: 'ASC' },
    });
    let treatments = 0;
    for (const [vi, visit] of visits.entries()) {
      // Photos at a treatment visit are taken before the injection; the change shows from the next visit on.
      const lipVolume = Math.min(1, plan.baseline + PER_TREATMENT * treatments);
      const views = pi === 0 && vi === visits.length - 1 ? ALL_VIEWS : COMPARED_VIEWS;
      views.forEach((view, k) => {
        const capturedAt = new Date(Date.parse(visit.startsAt) + (4 + k) * 60_000).toISOString();
        jobs.push({ visit, view, lipVolume, face: plan.face, shot: vi, capturedAt });
      });
      if (visit.kind === 'treatment') treatments += 1;
    }
  }
  // Two at a time: drawing (librsvg) and the pipeline (libvips) each keep one core busy.
  let next = 0;
  let stored = 0;
  const worker = async () => {
    while (next < jobs.length && !opts.stopped?.()) {
      const job = jobs[next++];
      const bytes = await renderPortrait({ seed: job.face, view: job.view, lipVolume: job.lipVolume, shot: job.shot }, { capturedAt: job.capturedAt });
      const { created } = await ingestPhoto(deps, { visit: job.visit, viewKey: job.view, bytes, uploadedById: job.visit.practitionerId, req: null });
      if (created) stored += 1;
    }
  };
  await Promise.all([worker(), worker()]);
  return stored;
}
