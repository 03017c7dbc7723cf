import type { Router } from 'express';
import { z } from 'zod';
import { allow, CLINICAL } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Patient } from '../../entities/patient.js';
import { audit, auditOnce } from '../../lib/audit.js';
import { conflict, notFound } from '../../lib/errors.js';
import { newId } from '../../lib/time.js';
import { queueMail } from '../../mail/outbox.js';
import { patientDocumentKey } from '../../storage/keys.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { comparisonSheetSchema, pairQuerySchema } from './compare.schemas.js';
import { comparePair } from './comparison.js';
import { registerReviewRoutes } from './review.routes.js';
import { buildComparisonSheet } from './sheet.service.js';
import { sheetMail } from './sheet-mail.js';
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
    await auditOnce(db, req, { action: 'timeline.view', patientId: params.id, targetType: 'patient', targetId: params.id });
    res.json(timeline);
  });

  const pair = validate({ params: idParams, query: pairQuerySchema });
  r.get('/api/patients/:id/compare', allow(...CLINICAL), pair, async (req, res) => {
    const { params, query } = parsed(req, pair);
    const comparison = await comparePair(db, params.id, query.baseline, query.followUp);
    await audit(db, req, {
      action: 'compare.view',
      patientId: params.id,
      targetType: 'patient',
      targetId: params.id,
      details: { view: comparison.view.key, baseline: query.baseline, followUp: query.followUp },
    });
    res.json(comparison);
  });

  const sheet = validate({ params: idParams, body: comparisonSheetSchema });
  r.post('/api/patients/:id/comparison-sheet', allow(...CLINICAL), sheet, async (req, res) => {
    const { params, body } = parsed(req, sheet);
    const built = await buildComparisonSheet(deps, params.id, body);
    await audit(db, req, {
      action: 'comparison-sheet.download',
      patientId: params.id,
      targetType: 'patient',
      targetId: params.id,
      details: { view: built.viewKey, layout: body.layout, photos: built.photoIds, aligned: body.aligned },
    });
    res.set({ 'Content-Type': 'application/pdf', 'Content-Disposition': `attachment; filename="${built.fileName}"`, 'Content-Length': String(built.pdf.length) });
    res.end(built.pdf);
  });

  r.post('/api/patients/:id/comparison-sheet/email', allow(...CLINICAL), sheet, async (req, res) => {
    const { params, body } = parsed(req, sheet);
    const built = await buildComparisonSheet(deps, params.id, body);
    const to = built.patient.email;
    if (!to) throw conflict('This patient has no e-mail address on file. Add one to their details, or download the sheet instead.', { field: 'email' }, 'NO_EMAIL');
    const id = newId();
    const key = patientDocumentKey({ patientId: params.id, area: 'sheets', id, name: 'comparison', ext: 'pdf' });
    // The PDF is stored first; if queueing then fails, the orphan object is removed so nothing half-written stays.
    await deps.storage.put(key, built.pdf, 'application/pdf');
    const mail = await db
      .transaction(async (tx) => {
        const row = await queueMail(tx, {
          to,
          ...sheetMail({ clinicName: deps.config.clinicName, firstName: built.patient.firstName }),
          attachments: [{ key, filename: built.fileName, contentType: 'application/pdf' }],
          relatedType: 'comparison-sheet',
          relatedId: id,
          patientId: params.id,
        });
        await audit(tx, req, {
          action: 'comparison-sheet.email',
          patientId: params.id,
          targetType: 'patient',
          targetId: params.id,
          details: { view: built.viewKey, layout: body.layout, photos: built.photoIds, aligned: body.aligned, mailId: row.id, sheetKey: key },
        });
        return row;
      })
      .catch(async (err: unknown) => {
        await deps.storage.remove([key]).catch(() => undefined);
        throw err;
      });
    deps.mailer.kick();
    res.status(202).json({ queued: true, to, mailId: mail.id });
  });

  registerReviewRoutes(r, deps);
}
