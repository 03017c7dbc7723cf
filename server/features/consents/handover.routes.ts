import type { Request, Router } from 'express';
import { IsNull, MoreThan } from 'typeorm';
import { z } from 'zod';
import { allow, currentUser, STAFF } from '../../auth/access.js';
import { csrf } from '../../auth/session.js';
import type { Deps } from '../../deps.js';
import { AuditEvent } from '../../entities/audit-event.js';
import { ConsentTemplate } from '../../entities/consent-template.js';
import { HandoverSession } from '../../entities/handover-session.js';
import { Patient } from '../../entities/patient.js';
import { Visit } from '../../entities/visit.js';
import { audit, auditPatientRead } from '../../lib/audit.js';
import { badRequest, conflict, HttpError, notFound } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { signForm } from './consents.service.js';
import { claimHandoverSchema, createHandoverSchema, signFormSchema, templateParams } from './handover.schemas.js';
import { getSettings } from '../settings/settings.service.js';
import {
  boundHandover,
  closedReason,
  codeHash,
  formDone,
  handoverForms,
  newHandoverCode,
  newHandoverToken,
  parseProgress,
  parseTemplateIds,
  tokenHash,
} from './handover.service.js';

const idParams = z.object({ id: uuidParam });

/** Failed claims per address before claiming is paused (a short code must not be guessable by trying). */
export const CLAIM_LIMIT = { failures: 10, minutes: 15 };

const promisify = (fn: (cb: (err?: unknown) => void) => void) => new Promise<void>((resolve, reject) => fn((e) => (e ? reject(e) : resolve())));

/** Ends whatever this browser session was (staff sign-in or another hand-over) and binds it to a hand-over. */
async function bindDevice(req: Request, handoverId: string): Promise<string> {
  if (req.user) await promisify((cb) => req.logout(cb));
  else await promisify((cb) => req.session.regenerate(cb));
  req.session.handoverId = handoverId;
  const token = csrf.generateToken(req, true);
  await promisify((cb) => req.session.save(cb));
  return token;
}

/** Staff start hand-overs; the patient's device then reaches only the /api/handover routes. */
export function registerHandoverRoutes(r: Router, deps: Deps): void {
  const { db, config } = deps;
  const sessions = db.getRepository(HandoverSession);

  const create = validate({ body: createHandoverSchema });
  r.post('/api/handovers', allow(...STAFF), create, async (req, res) => {
    const { body } = parsed(req, create);
    const staff = currentUser(req);
    const patient = await db.getRepository(Patient).findOneBy({ id: body.patientId });
    if (!patient) throw notFound('Patient');
    if (patient.archived) throw conflict('This patient is archived.', undefined, 'PATIENT_ARCHIVED');
    if (body.visitId && !(await db.getRepository(Visit).existsBy({ id: body.visitId, patientId: patient.id }))) {
      throw badRequest('The visit does not belong to this patient.', { field: 'visitId' });
    }
    const templates = await db.getRepository(ConsentTemplate).findBy(body.templateIds.map((id) => ({ id })));
    const missing = body.templateIds.filter((id) => !templates.some((t) => t.id === id));
    if (missing.length) throw badRequest('A chosen form does not exist.', { missing }, 'TEMPLATE_UNKNOWN');
    const notOffered = templates.filter((t) => t.status !== 'published');
    if (notOffered.length) {
      const retired = notOffered.some((t) => t.status === 'retired');
      throw conflict(
        retired ? 'A chosen form version is retired and can no longer be offered; choose its current version.' : 'A chosen form is still a draft; publish it first.',
        { templates: notOffered.map((t) => ({ id: t.id, status: t.status })) },
        retired ? 'TEMPLATE_RETIRED' : 'TEMPLATE_NOT_PUBLISHED',
      );
    }
    const now = new Date();
    const token = newHandoverToken();
    let code: string | null = null;
    if (body.mode === 'second-device') {
      // Codes are short, so make sure no other open hand-over holds the same one.
      do code = newHandoverCode();
      while (await sessions.existsBy({ codeHash: codeHash(code), claimedAt: IsNull(), expiresAt: MoreThan(now.toISOString()) }));
    }
    const h = sessions.create({
      id: newId(),
      tokenHash: tokenHash(token),
      codeHash: code ? codeHash(code) : null,
      mode: body.mode,
      patientId: patient.id,
      visitId: body.visitId ?? null,
      templateIds: JSON.stringify(body.templateIds),
      progress: '{}',
      expiresAt: new Date(now.getTime() + config.handoverMinutes * 60_000).toISOString(),
      createdById: staff.id,
      createdAt: now.toISOString(),
      createdIp: req.ip ?? null,
      createdUserAgent: req.get('user-agent')?.slice(0, 300) ?? null,
      claimedAt: body.mode === 'this-device' ? now.toISOString() : null,
      claimedIp: body.mode === 'this-device' ? (req.ip ?? null) : null,
      claimedUserAgent: body.mode === 'this-device' ? (req.get('user-agent')?.slice(0, 300) ?? null) : null,
      completedAt: null,
      cancelledAt: null,
    });
    await db.transaction(async (tx) => {
      await tx.getRepository(HandoverSession).insert(h);
      await audit(tx, req, { action: 'handover.start', patientId: patient.id, targetType: 'handover', targetId: h.id, details: { mode: h.mode, forms: body.templateIds.length } });
    });
    const summary = { id: h.id, mode: h.mode, patientId: h.patientId, expiresAt: h.expiresAt };
    if (body.mode === 'this-device') {
      // The staff sign-in ends here: giving the tablet back needs a staff sign-in again.
      const csrfToken = await bindDevice(req, h.id);
      res.status(201).json({ ...summary, csrfToken });
      return;
    }
    res.status(201).json({ ...summary, code, token, path: `/handover#claim=${token}` });
  });

  const one = validate({ params: idParams });
  r.get('/api/handovers/:id', allow(...STAFF), one, async (req, res) => {
    const { params } = parsed(req, one);
    const h = await sessions.findOneBy({ id: params.id });
    if (!h) throw notFound('Hand-over');
    const forms = await handoverForms(db, h);
    await auditPatientRead(db, req, { action: 'handover.view', patientId: h.patientId, targetType: 'handover', targetId: h.id });
    res.json({
      id: h.id,
      mode: h.mode,
      patientId: h.patientId,
      visitId: h.visitId,
      createdAt: h.createdAt,
      expiresAt: h.expiresAt,
      claimedAt: h.claimedAt,
      completedAt: h.completedAt,
      cancelledAt: h.cancelledAt,
      state: h.completedAt ? 'completed' : (closedReason(h) ?? (h.claimedAt ? 'in-progress' : 'waiting')),
      forms: forms.map((f) => ({ templateId: f.templateId, kind: f.kind, title: f.title, version: f.version, state: f.state, consentId: f.consentId })),
    });
  });

  r.post('/api/handovers/:id/cancel', allow(...STAFF), one, async (req, res) => {
    const { params } = parsed(req, one);
    const h = await sessions.findOneBy({ id: params.id });
    if (!h) throw notFound('Hand-over');
    if (h.completedAt || h.cancelledAt) throw conflict('This hand-over has already ended.', undefined, 'HANDOVER_ENDED');
    await db.transaction(async (tx) => {
      await tx.getRepository(HandoverSession).update({ id: h.id }, { cancelledAt: nowIso() });
      await audit(tx, req, { action: 'handover.cancel', patientId: h.patientId, targetType: 'handover', targetId: h.id });
    });
    res.status(204).end();
  });

  const claim = validate({ body: claimHandoverSchema });
  r.post('/api/handover/claim', claim, async (req, res) => {
    const { body } = parsed(req, claim);
    const since = new Date(Date.now() - CLAIM_LIMIT.minutes * 60_000).toISOString();
    const failures = await db.getRepository(AuditEvent).countBy({ action: 'handover.claim_failed', ip: req.ip ?? 'unknown', at: MoreThan(since) });
    if (failures >= CLAIM_LIMIT.failures) {
      throw new HttpError(429, 'TOO_MANY_ATTEMPTS', `Too many wrong codes. Ask the clinic for help, or try again in ${CLAIM_LIMIT.minutes} minutes.`);
    }
    const found = body.token
      ? await sessions.findOneBy({ tokenHash: tokenHash(body.token) })
      : await sessions.findOne({ where: { codeHash: codeHash(body.code!) }, order: { createdAt: 'DESC' } });
    const fail = async (status: number, code: string, message: string) => {
      await audit(db, req, { action: 'handover.claim_failed', targetType: 'handover', targetId: found?.id ?? null, details: { reason: code } });
      return new HttpError(status, code, message);
    };
    if (!found || found.mode !== 'second-device') throw await fail(400, 'HANDOVER_CODE_INVALID', 'That code is not right. Check it and try again.');
    if (found.claimedAt) throw await fail(409, 'HANDOVER_USED', 'This code has already been used. Ask the clinic for a new one.');
    const reason = closedReason(found);
    if (reason) throw await fail(410, 'HANDOVER_EXPIRED', `This code has ${reason === 'expired' ? 'expired' : 'been cancelled'}. Ask the clinic for a new one.`);
    const now = nowIso();
    // Claimed once: of two devices racing with the same code, only one wins this conditional update.
    const won = await db
      .createQueryBuilder()
      .update(HandoverSession)
      .set({ claimedAt: now, claimedIp: req.ip ?? null, claimedUserAgent: req.get('user-agent')?.slice(0, 300) ?? null })
      .where('id = :id AND "claimedAt" IS NULL', { id: found.id })
      .execute();
    if (won.affected !== 1) throw await fail(409, 'HANDOVER_USED', 'This code has already been used. Ask the clinic for a new one.');
    const csrfToken = await bindDevice(req, found.id);
    await audit(db, req, { action: 'handover.claim', patientId: found.patientId, targetType: 'handover', targetId: found.id, details: { via: body.token ? 'link' : 'code' } });
    res.json({ id: found.id, expiresAt: found.expiresAt, csrfToken });
  });

  r.get('/api/handover', allow('handover'), async (req, res) => {
    const h = await boundHandover(db, req);
    const forms = await handoverForms(db, h);
    const patient = await db.getRepository(Patient).findOneByOrFail({ id: h.patientId });
    res.json({
      id: h.id,
      clinicName: (await getSettings(db, config)).clinicName,
      expiresAt: h.expiresAt,
      completed: Boolean(h.completedAt),
      patient: { firstName: patient.firstName, lastName: patient.lastName },
      forms,
    });
  });

  const shown = validate({ params: templateParams });
  r.post('/api/handover/forms/:templateId/shown', allow('handover'), shown, async (req, res) => {
    const { params } = parsed(req, shown);
    const at = await db.transaction(async (tx) => {
      const h = await boundHandover(tx, req);
      if (!parseTemplateIds(h).includes(params.templateId)) throw notFound('Form');
      const p = parseProgress(h);
      if (!p[params.templateId]?.shownAt) {
        p[params.templateId] = { ...p[params.templateId], shownAt: nowIso() };
        await tx.getRepository(HandoverSession).update({ id: h.id }, { progress: JSON.stringify(p) });
      }
      return p[params.templateId].shownAt!;
    });
    res.json({ templateId: params.templateId, shownAt: at });
  });

  const decline = validate({ params: templateParams });
  r.post('/api/handover/forms/:templateId/decline', allow('handover'), decline, async (req, res) => {
    const { params } = parsed(req, decline);
    const out = await db.transaction(async (tx) => {
      const h = await boundHandover(tx, req);
      if (!parseTemplateIds(h).includes(params.templateId)) throw notFound('Form');
      const t = await tx.getRepository(ConsentTemplate).findOneByOrFail({ id: params.templateId });
      if (t.kind !== 'showcase') throw conflict('This form is needed for your treatment; please talk to the clinic if you do not want to sign it.', undefined, 'FORM_REQUIRED');
      const p = parseProgress(h);
      if (formDone(p[params.templateId])) throw conflict('This form has already been completed.', undefined, 'FORM_ALREADY_DONE');
      const now = nowIso();
      p[params.templateId] = { ...p[params.templateId], declinedAt: now };
      const done = parseTemplateIds(h).every((id) => formDone(p[id]));
      await tx.getRepository(HandoverSession).update({ id: h.id }, { progress: JSON.stringify(p), ...(done ? { completedAt: now } : {}) });
      await audit(tx, req, { action: 'handover.form_declined', patientId: h.patientId, targetType: 'handover', targetId: h.id, details: { templateId: t.id, kind: t.kind } });
      return { templateId: t.id, declinedAt: now, completed: done };
    });
    res.json(out);
  });

  const sign = validate({ params: templateParams, body: signFormSchema });
  r.post('/api/handover/forms/:templateId/sign', allow('handover'), sign, async (req, res) => {
    const { params, body } = parsed(req, sign);
    const h = await boundHandover(db, req);
    const result = await signForm(deps, req, h, params.templateId, body);
    res.status(201).json({
      consentId: result.consent.id,
      templateId: params.templateId,
      signedAt: result.consent.signedAt,
      warnings: result.warnings,
      completed: result.completed,
    });
  });
}
