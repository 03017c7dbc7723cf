import type { Request, Router } from 'express';
import { z } from 'zod';
import { allow, CLINICAL, currentUser } from '../../auth/access.js';
import { verifyPassword } from '../../auth/passwords.js';
import type { Deps } from '../../deps.js';
import { Patient } from '../../entities/patient.js';
import { Photo } from '../../entities/photo.js';
import { User } from '../../entities/user.js';
import { audit } from '../../lib/audit.js';
import { badRequest, conflict, HttpError, notFound } from '../../lib/errors.js';
import { nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { exitReviewSchema, startReviewSchema } from './compare.schemas.js';
import { REVIEW_EXIT_ATTEMPTS } from './review-lock.js';

const idParams = z.object({ id: uuidParam });

function endSession(req: Request): Promise<void> {
  return new Promise<void>((resolve, reject) => req.logout((e) => (e ? reject(e) : resolve()))).then(
    () => new Promise<void>((resolve, reject) => req.session.destroy((e) => (e ? reject(e) : resolve()))),
  );
}

/**
 * Review mode (DESIGN §3): the tablet shows one patient's comparison, full screen, to that patient. It is kept in the
 * staff member's session, so a reload comes back to it, and `reviewLock` confines the API to that patient meanwhile.
 *
 * Leaving needs the signed-in staff member's own password. Why the password rather than a PIN: it is the factor the
 * clinic already manages per person (HIPAA 164.312(d) person authentication), so there is no second secret to hand
 * out, rotate or share at the desk. After `REVIEW_EXIT_ATTEMPTS` wrong entries the staff session on the device ends,
 * which leaves the sign-in screen: guessing is capped and nothing of the patient stays on screen.
 */
export function registerReviewRoutes(r: Router, { db }: Deps): void {
  const start = validate({ params: idParams, body: startReviewSchema });
  r.post('/api/patients/:id/review', allow(...CLINICAL), start, async (req, res) => {
    const { params, body } = parsed(req, start);
    const patient = await db.getRepository(Patient).findOneBy({ id: params.id });
    if (!patient) throw notFound('Patient');
    const photoIds = [body.baselinePhotoId, body.followUpPhotoId].filter((x): x is string => !!x);
    if (photoIds.length) {
      const rows = await db.getRepository(Photo).find({ where: photoIds.map((id) => ({ id })), select: { id: true, patientId: true, viewKey: true } });
      for (const id of photoIds) {
        const p = rows.find((x) => x.id === id);
        if (!p || p.patientId !== patient.id) throw badRequest('A chosen photo is not one of this patient\'s photos.', { field: 'photoIds', id }, 'PHOTO_OF_ANOTHER_PATIENT');
        if (p.viewKey !== body.view) throw badRequest('A comparison pairs photos of one view only.', { field: 'view', id, view: p.viewKey }, 'VIEW_MISMATCH');
      }
    }
    const current = req.session.review;
    if (current && current.patientId !== patient.id) throw conflict('Review mode is already on for another patient on this device.', undefined, 'REVIEW_MODE');
    const review = { patientId: patient.id, startedAt: current?.startedAt ?? nowIso(), failures: 0, setup: body };
    req.session.review = review;
    await audit(db, req, { action: 'review.start', patientId: patient.id, targetType: 'patient', targetId: patient.id, details: { view: body.view, mode: body.mode } });
    res.status(201).json({ active: true, patientId: review.patientId, startedAt: review.startedAt, setup: review.setup });
  });

  r.get('/api/review', allow(...CLINICAL), (req, res) => {
    const review = req.session.review;
    res.json(review ? { active: true, patientId: review.patientId, startedAt: review.startedAt, setup: review.setup } : { active: false });
  });

  const exit = validate({ body: exitReviewSchema });
  r.post('/api/review/exit', allow(...CLINICAL), exit, async (req, res) => {
    const { body } = parsed(req, exit);
    const review = req.session.review;
    if (!review) throw conflict('Review mode is not on.', undefined, 'NOT_IN_REVIEW');
    const me = currentUser(req);
    const user = await db.getRepository(User).findOneBy({ id: me.id });
    if (user && user.active && (await verifyPassword(user.passwordHash, body.password))) {
      delete req.session.review;
      await audit(db, req, { action: 'review.end', patientId: review.patientId, targetType: 'patient', targetId: review.patientId, details: { startedAt: review.startedAt } });
      res.json({ active: false, patientId: review.patientId });
      return;
    }
    review.failures += 1;
    await audit(db, req, { action: 'review.exit_refused', patientId: review.patientId, targetType: 'patient', targetId: review.patientId, details: { failures: review.failures } });
    if (review.failures >= REVIEW_EXIT_ATTEMPTS) {
      await endSession(req);
      res.clearCookie('tf.sid');
      throw new HttpError(401, 'SESSION_ENDED', 'Too many wrong passwords: you have been signed out. Sign in again to continue.');
    }
    const left = REVIEW_EXIT_ATTEMPTS - review.failures;
    throw new HttpError(400, 'WRONG_PASSWORD', `That is not your password. ${left} ${left === 1 ? 'try' : 'tries'} left before you are signed out.`, {
      field: 'password',
      attemptsLeft: left,
    });
  });
}
