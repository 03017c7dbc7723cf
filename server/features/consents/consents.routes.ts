import type { Router } from 'express';
import { z } from 'zod';
import { allow, CLINICAL, currentUser, STAFF } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { ConsentEvidence } from '../../entities/consent-evidence.js';
import { ConsentRecord } from '../../entities/consent-record.js';
import { ConsentTemplate, type ShowcaseChannel } from '../../entities/consent-template.js';
import { Patient } from '../../entities/patient.js';
import { Visit } from '../../entities/visit.js';
import { audit, auditPatientRead } from '../../lib/audit.js';
import { badRequest, conflict, forbidden, notFound } from '../../lib/errors.js';
import { dayIn, newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { alertAdmins } from '../../mail/admin-alert.js';
import { queueMail } from '../../mail/outbox.js';
import { sha256Hex } from './hash.js';
import { emitConsentWithdrawn } from './consent-events.js';
import { consentFileName, withdrawalMail } from './consent-mail.js';
import { acknowledgeFlagsSchema, withdrawSchema } from './consents.schemas.js';
import { canSeeClinicalContent, consentViews, verifyConsent } from './consents.service.js';
import { openItemsForVisit } from './open-items.js';
import { getSettings } from '../settings/settings.service.js';

const idParams = z.object({ id: uuidParam });

/** Consents that a patient may withdraw here; treatment consent and screening answers are part of the clinical record. */
const WITHDRAWABLE = new Set(['photography', 'showcase']);

export function registerConsentRoutes(r: Router, deps: Deps): void {
  const { db, config } = deps;
  const consents = db.getRepository(ConsentRecord);

  const byPatient = validate({ params: idParams });
  r.get('/api/patients/:id/consents', allow(...STAFF), byPatient, async (req, res) => {
    const { params } = parsed(req, byPatient);
    if (!(await db.getRepository(Patient).existsBy({ id: params.id }))) throw notFound('Patient');
    const rows = await consents.find({ where: { patientId: params.id }, order: { signedAt: 'DESC' } });
    await auditPatientRead(db, req, { action: 'consent.list', patientId: params.id, targetType: 'patient', targetId: params.id });
    res.json(await consentViews(db, req, rows));
  });

  const one = validate({ params: idParams });
  const load = async (id: string) => {
    const c = await consents.findOneBy({ id });
    if (!c) throw notFound('Consent');
    return c;
  };

  r.get('/api/consents/:id', allow(...STAFF), one, async (req, res) => {
    const { params } = parsed(req, one);
    const c = await load(params.id);
    const all = await consents.findBy({ patientId: c.patientId });
    const [view] = await consentViews(db, req, [c], all);
    const clinical = canSeeClinicalContent(req, c.kind);
    const evidence = await db.getRepository(ConsentEvidence).find({ where: { consentId: c.id }, order: { at: 'ASC' } });
    await audit(db, req, { action: 'consent.view', patientId: c.patientId, targetType: 'consent', targetId: c.id });
    res.json({
      ...view,
      evidence: evidence.map((e) => ({
        at: e.at,
        event: e.event,
        actorId: e.actorId,
        actorRole: e.actorRole,
        ip: e.ip,
        userAgent: e.userAgent,
        details: e.event === 'flags.acknowledged' && !clinical ? {} : JSON.parse(e.details),
      })),
    });
  });

  r.get('/api/consents/:id/pdf', allow(...STAFF), one, async (req, res) => {
    const { params } = parsed(req, one);
    const c = await load(params.id);
    if (!canSeeClinicalContent(req, c.kind)) throw forbidden('A health questionnaire holds clinical answers; only clinicians can open it.');
    const template = await db.getRepository(ConsentTemplate).findOneByOrFail({ id: c.templateId });
    const pdf = await deps.storage.get(c.pdfKey);
    const actual = sha256Hex(pdf);
    if (actual !== c.pdfSha256) {
      // Never hand out a document that is not the one signed: refuse, log it and tell the admins.
      await db.transaction(async (tx) => {
        await audit(tx, req, { action: 'consent.pdf_altered', patientId: c.patientId, targetType: 'consent', targetId: c.id, details: { expected: c.pdfSha256, actual } });
        await alertAdmins(tx, {
          subject: 'A stored consent PDF does not match its signed fingerprint',
          text: `The stored PDF of consent record ${c.id} (${c.kind}, signed ${c.signedAt}) no longer matches the SHA-256 recorded when it was signed.\n\nRecorded: ${c.pdfSha256}\nStored now: ${actual}\n\nIt was not shown. Open the record in Twinframe and use Verify for details, then restore the document from your backups.`,
          relatedType: 'consent-pdf-altered',
          relatedId: c.id,
          patientId: c.patientId,
        });
      });
      deps.mailer.kick();
      throw conflict(
        "This consent's stored PDF does not match the fingerprint recorded when it was signed, so it was not shown. The clinic's admins have been alerted; use Verify on the record for details.",
        { expected: c.pdfSha256, actual },
        'DOCUMENT_ALTERED',
      );
    }
    await audit(db, req, { action: 'consent.pdf_view', patientId: c.patientId, targetType: 'consent', targetId: c.id });
    res.set('Content-Type', 'application/pdf');
    res.set('Content-Disposition', `inline; filename="${consentFileName(c.kind, template.version, c.signedAt)}"`);
    res.set('Content-Length', String(pdf.length));
    res.end(pdf);
  });

  r.get('/api/consents/:id/verify', allow(...STAFF), one, async (req, res) => {
    const { params } = parsed(req, one);
    const c = await load(params.id);
    const result = await verifyConsent(deps, c);
    await audit(db, req, { action: 'consent.verify', patientId: c.patientId, targetType: 'consent', targetId: c.id, details: { status: result.status } });
    res.json(result);
  });

  const withdraw = validate({ params: idParams, body: withdrawSchema });
  r.post('/api/consents/:id/withdraw', allow(...STAFF), withdraw, async (req, res) => {
    const { params, body } = parsed(req, withdraw);
    const staff = currentUser(req);
    const c = await load(params.id);
    if (!WITHDRAWABLE.has(c.kind)) {
      throw conflict('Only a photography or showcase consent is withdrawn here. Record a change of mind about treatment in the visit.', { kind: c.kind }, 'NOT_WITHDRAWABLE');
    }
    if (c.withdrawnAt) throw conflict(`This consent was already withdrawn on ${c.withdrawalDate}.`, undefined, 'ALREADY_WITHDRAWN');
    const clinic = await getSettings(db, config);
    const today = dayIn(clinic.timeZone);
    const date = body.date ?? today;
    if (date > today) throw badRequest('The withdrawal date cannot be in the future.', { field: 'date' });
    if (date < dayIn(clinic.timeZone, new Date(c.signedAt))) throw badRequest('The withdrawal date is before the consent was signed.', { field: 'date' });
    const patient = await db.getRepository(Patient).findOneByOrFail({ id: c.patientId });
    const template = await db.getRepository(ConsentTemplate).findOneByOrFail({ id: c.templateId });
    const now = nowIso();
    const updated = await db.transaction(async (tx) => {
      await tx.getRepository(ConsentEvidence).insert({
        id: newId(),
        consentId: c.id,
        at: now,
        event: 'consent.withdrawn',
        actorId: staff.id,
        actorRole: staff.role,
        ip: req.ip ?? null,
        userAgent: req.get('user-agent')?.slice(0, 300) ?? null,
        details: JSON.stringify({ date, reason: body.reason }),
      });
      // The one change a consent record allows: the withdrawal fields, set once, after its evidence row (triggers enforce both).
      const result = await tx
        .createQueryBuilder()
        .update(ConsentRecord)
        .set({ withdrawnAt: now, withdrawnById: staff.id, withdrawalReason: body.reason, withdrawalDate: date })
        .where('id = :id AND "withdrawnAt" IS NULL', { id: c.id })
        .execute();
      if (result.affected !== 1) throw conflict('This consent was already withdrawn.', undefined, 'ALREADY_WITHDRAWN');
      const fresh = await tx.getRepository(ConsentRecord).findOneByOrFail({ id: c.id });
      if (patient.email) {
        await queueMail(tx, {
          to: patient.email,
          ...withdrawalMail({
            clinicName: clinic.clinicName,
            firstName: patient.firstName,
            title: template.title,
            kind: c.kind,
            version: c.templateVersion,
            signedAt: c.signedAt,
            withdrawalDate: date,
            timeZone: c.timeZone,
            recordId: c.id,
            channels: JSON.parse(c.channels) as ShowcaseChannel[],
          }),
          relatedType: 'consent-withdrawal',
          relatedId: c.id,
          patientId: patient.id,
        });
      }
      await audit(tx, req, { action: 'consent.withdraw', patientId: c.patientId, targetType: 'consent', targetId: c.id, details: { kind: c.kind, date } });
      await emitConsentWithdrawn({ consent: fresh, tx, req });
      return fresh;
    });
    deps.mailer.kick();
    const all = await consents.findBy({ patientId: c.patientId });
    const [view] = await consentViews(db, req, [updated], all);
    res.json(view);
  });

  const ack = validate({ params: idParams, body: acknowledgeFlagsSchema });
  r.post('/api/consents/:id/acknowledge-flags', allow(...CLINICAL), ack, async (req, res) => {
    const { params, body } = parsed(req, ack);
    const staff = currentUser(req);
    const c = await load(params.id);
    const flagged = JSON.parse(c.flaggedQuestionIds) as string[];
    if (c.kind !== 'screening' || flagged.length === 0) throw conflict('This record has no flagged screening answers.', undefined, 'NO_FLAGS');
    const at = nowIso();
    await db.transaction(async (tx) => {
      if (await tx.getRepository(ConsentEvidence).existsBy({ consentId: c.id, event: 'flags.acknowledged' })) {
        throw conflict('The flagged answers were already reviewed.', undefined, 'ALREADY_ACKNOWLEDGED');
      }
      await tx.getRepository(ConsentEvidence).insert({
        id: newId(),
        consentId: c.id,
        at,
        event: 'flags.acknowledged',
        actorId: staff.id,
        actorRole: staff.role,
        ip: req.ip ?? null,
        userAgent: req.get('user-agent')?.slice(0, 300) ?? null,
        details: JSON.stringify({ note: body.note, flaggedQuestionIds: flagged, byName: staff.name }),
      });
      await audit(tx, req, { action: 'consent.flags_acknowledge', patientId: c.patientId, targetType: 'consent', targetId: c.id, details: { flagged: flagged.length } });
    });
    res.json({ consentId: c.id, acknowledgedAt: at, acknowledgedById: staff.id, note: body.note, flaggedQuestionIds: flagged });
  });

  const visitItems = validate({ params: idParams });
  r.get('/api/visits/:id/open-items', allow(...STAFF), visitItems, async (req, res) => {
    const { params } = parsed(req, visitItems);
    const visit = await db.getRepository(Visit).findOneBy({ id: params.id });
    if (!visit) throw notFound('Visit');
    const items = await openItemsForVisit(db, req, visit);
    await auditPatientRead(db, req, { action: 'visit.open-items', patientId: visit.patientId, targetType: 'visit', targetId: visit.id });
    res.json({ visitId: visit.id, ready: items.length === 0, items });
  });
}
