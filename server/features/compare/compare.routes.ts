import type { Router } from 'express';
import { z } from 'zod';
import { allow, CLINICAL } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Patient } from '../../entities/patient.js';
import { audit } from '../../lib/audit.js';
import { notFound } from '../../lib/errors.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { registerReviewRoutes } from './review.routes.js';
import { loadTimeline } from './timeline.js';

const idParams = z.object({ id: uuidParam });

/** Compare and review: the patient timeline, review mode and the comparison sheet. Clinical staff only. */
export function registerCompareRoutes(r: Router, deps: Deps): void {
  const { db } = deps;

  const one = validate({ params: idParams });
  r.get('/api/patients/:id/timeline', allow(...CLINICAL), one, async (req, res) => {
    const { params } = parsed(req, one);
    if (!(await db.getRepository(Patient).existsBy({ id: params.id }))) throw notFound('Patient');
    const timeline = await loadTimeline(db, params.id);
    await audit(db, req, { action: 'timeline.view', patientId: params.id, targetType: 'patient', targetId: params.id });
    res.json(timeline);
  });

  registerReviewRoutes(r, deps);
}
