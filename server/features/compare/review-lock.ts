import type { Request, RequestHandler } from 'express';
import type { DataSource } from 'typeorm';
import { Photo } from '../../entities/photo.js';
import { HttpError } from '../../lib/errors.js';
import type { ReviewSetup } from './compare.schemas.js';

declare module 'express-session' {
  interface SessionData {
    /**
     * Set while the device shows review mode to a patient. The staff member stays signed in, but the API answers only
     * this patient's comparison until the staff member confirms with their password (POST /api/review/exit).
     */
    review?: { patientId: string; startedAt: string; failures: number; setup: ReviewSetup };
  }
}

/** Wrong passwords allowed while leaving review mode; the next one ends the staff session on this device. */
export const REVIEW_EXIT_ATTEMPTS = 5;

const UUID = '[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}';

/** Calls that never reveal another patient: the staff member's own session, and review mode itself. */
const ALWAYS: { method: string; path: RegExp }[] = [
  { method: 'GET', path: /^\/api\/health$/ },
  { method: 'GET', path: /^\/api\/auth\/(me|csrf)$/ },
  { method: 'POST', path: /^\/api\/auth\/logout$/ },
  { method: 'GET', path: /^\/api\/review$/ },
  { method: 'POST', path: /^\/api\/review\/exit$/ },
];

/**
 * Reads of the reviewed patient that the review screen uses. The visit list is left out on purpose: it carries the
 * staff's visit notes, and the comparison payloads already carry each visit's date and kind.
 */
const PATIENT_READ = new RegExp(`^/api/patients/(${UUID})(/(timeline|compare|pairs|measurements))?$`);
const PHOTO_READ = new RegExp(`^/api/photos/(${UUID})(/file)?$`);

function refuse(): HttpError {
  return new HttpError(403, 'REVIEW_MODE', 'This tablet is in review mode for one patient. Leave review mode first (staff password).');
}

/**
 * While review mode is on, the API answers only an allow-list of reads of the reviewed patient (default deny): the
 * patient holding the tablet cannot reach another record by typing an address or replaying a request. The check is on
 * the server because the client hiding navigation is no protection (DESIGN §2).
 */
export function reviewLock(db: DataSource): RequestHandler {
  return (req, _res, next) => {
    const review = req.session?.review;
    if (!review || !req.user) return next();
    const path = req.originalUrl.split('?')[0];
    if (ALWAYS.some((a) => a.method === req.method && a.path.test(path))) return next();
    if (req.method !== 'GET') return next(refuse());
    const patientRead = PATIENT_READ.exec(path);
    if (patientRead) return next(patientRead[1] === review.patientId ? undefined : refuse());
    const photoRead = PHOTO_READ.exec(path);
    // Screens show display-size photos; the full-resolution master is not for the patient's tablet.
    if (photoRead && req.query.variant !== 'master') {
      photoOwner(db, photoRead[1]).then((owner) => next(owner === review.patientId ? undefined : refuse()), next);
      return;
    }
    next(refuse());
  };
}

async function photoOwner(db: DataSource, photoId: string): Promise<string | null> {
  const row = await db.getRepository(Photo).findOne({ where: { id: photoId }, select: { id: true, patientId: true } });
  return row?.patientId ?? null;
}

/** The review of this request's session, if review mode is on. */
export const activeReview = (req: Request) => req.session?.review ?? null;
