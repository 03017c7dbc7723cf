import type { Router } from 'express';
import { z } from 'zod';
import { allow, CLINICAL } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Consultation, type PlanStage } from '../../entities/consultation.js';
import { Patient } from '../../entities/patient.js';
import { Reminder } from '../../entities/reminder.js';
import { Treatment } from '../../entities/treatment.js';
import { Visit } from '../../entities/visit.js';
import { audit } from '../../lib/audit.js';
import { notFound } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { LIP_RATIO_PRESETS } from '../landmarks/landmarks.schemas.js';
import { getSettings } from '../settings/settings.service.js';
import { acknowledgeFlags, latestScreening, screeningReview } from './screening.js';
import { cumulativeTotals } from './totals.js';
import { acknowledgeFlagSchema, consultationInputSchema, LIMITS, treatmentInputSchema } from './treatments.schemas.js';
import { loadTreatment, saveTreatment, treatmentView } from './treatments.service.js';

const idParams = z.object({ id: uuidParam });
const acknowledgeSchema = z
  .object({
    consentId: z.string().uuid('Not a valid questionnaire id.'),
    notes: z.array(acknowledgeFlagSchema).min(1, 'Write a note for each flagged answer.').max(40),
  })
  .strict();

function consultationView(c: Consultation) {
  return { ...c, goals: JSON.parse(c.goals) as string[], plan: JSON.parse(c.plan) as PlanStage[] };
}

/** Treatment record, screening review and consultation of a visit. Clinical only: coordinators never see them. */
export function registerTreatmentRoutes(r: Router, { db, config }: Deps): void {
  const visitOr404 = async (id: string) => {
    const v = await db.getRepository(Visit).findOneBy({ id });
    if (!v) throw notFound('Visit');
    return v;
  };

  r.get('/api/treatment-settings', allow(...CLINICAL), async (_req, res) => {
    const settings = await getSettings(db, config);
    res.json({
      highVolumeMl: config.treatments.highVolumeMl,
      lotWarnDays: config.treatments.lotWarnDays,
      reviewDays: settings.reviewReminderDays,
      maintenanceMonths: settings.maintenanceReminderMonths,
      timeZone: settings.timeZone,
      limits: LIMITS,
    });
  });

  const one = validate({ params: idParams });
  r.get('/api/visits/:id/treatment', allow(...CLINICAL), one, async (req, res) => {
    const { params } = parsed(req, one);
    const visit = await visitOr404(params.id);
    const t = await loadTreatment(db, { visitId: visit.id });
    if (!t) throw notFound('Treatment');
    const reminders = await db.getRepository(Reminder).find({ where: { treatmentId: t.id }, order: { dueAt: 'ASC' } });
    await audit(db, req, { action: 'treatment.view', patientId: t.patientId, targetType: 'treatment', targetId: t.id });
    res.json(treatmentView(t, reminders, config.treatments));
  });

  const save = validate({ params: idParams, body: treatmentInputSchema });
  r.put('/api/visits/:id/treatment', allow(...CLINICAL), save, async (req, res) => {
    const { params, body } = parsed(req, save);
    const visit = await visitOr404(params.id);
    const { created, treatment, warnings } = await saveTreatment(db, req, config, visit, body);
    const reminders = await db.getRepository(Reminder).find({ where: { treatmentId: treatment.id }, order: { dueAt: 'ASC' } });
    res.status(created ? 201 : 200).json(treatmentView(treatment, reminders, config.treatments, warnings));
  });

  r.get('/api/patients/:id/treatments', allow(...CLINICAL), one, async (req, res) => {
    const { params } = parsed(req, one);
    if (!(await db.getRepository(Patient).existsBy({ id: params.id }))) throw notFound('Patient');
    const rows = await db.getRepository(Treatment).find({
      where: { patientId: params.id },
      relations: { lines: { doses: true }, practitioner: true },
      order: { treatedAt: 'ASC', lines: { position: 'ASC' } },
    });
    const reminders = await db.getRepository(Reminder).find({ where: { patientId: params.id }, order: { dueAt: 'ASC' } });
    const { entries, total } = cumulativeTotals(rows.map((t) => ({ id: t.id, treatedAt: t.treatedAt, lines: (t.lines ?? []).map((l) => ({ kind: l.kind, doses: l.doses ?? [] })) })));
    await audit(db, req, { action: 'treatment.list', patientId: params.id, targetType: 'patient', targetId: params.id });
    res.json({
      treatments: rows.map((t) => ({
        ...treatmentView(t, reminders.filter((x) => x.treatmentId === t.id), config.treatments),
        cumulative: entries.find((e) => e.treatmentId === t.id)!.cumulative,
      })),
      total,
    });
  });

  r.get('/api/visits/:id/screening', allow(...CLINICAL), one, async (req, res) => {
    const { params } = parsed(req, one);
    const visit = await visitOr404(params.id);
    const record = await latestScreening(db, visit.patientId);
    await audit(db, req, { action: 'screening.view', patientId: visit.patientId, targetType: 'consent', targetId: record?.id ?? null, details: { visitId: visit.id } });
    res.json({ screening: record ? await screeningReview(db, record) : null });
  });

  const ack = validate({ params: idParams, body: acknowledgeSchema });
  r.post('/api/visits/:id/screening/acknowledge', allow(...CLINICAL), ack, async (req, res) => {
    const { params, body } = parsed(req, ack);
    const visit = await visitOr404(params.id);
    await db.transaction((tx) => acknowledgeFlags(tx, req, { consentId: body.consentId, visitId: visit.id, notes: body.notes, patientId: visit.patientId }));
    const record = await latestScreening(db, visit.patientId);
    res.json({ screening: record ? await screeningReview(db, record) : null });
  });

  r.get('/api/visits/:id/consultation', allow(...CLINICAL), one, async (req, res) => {
    const { params } = parsed(req, one);
    const visit = await visitOr404(params.id);
    const c = await db.getRepository(Consultation).findOneBy({ visitId: visit.id });
    if (!c) throw notFound('Consultation');
    await audit(db, req, { action: 'consultation.view', patientId: visit.patientId, targetType: 'consultation', targetId: c.id });
    res.json(consultationView(c));
  });

  const saveConsultation = validate({ params: idParams, body: consultationInputSchema });
  r.put('/api/visits/:id/consultation', allow(...CLINICAL), saveConsultation, async (req, res) => {
    const { params, body } = parsed(req, saveConsultation);
    const visit = await visitOr404(params.id);
    const { row, created } = await db.transaction(async (tx) => {
      const repo = tx.getRepository(Consultation);
      const existing = await repo.findOneBy({ visitId: visit.id });
      const now = nowIso();
      const fields = {
        goals: JSON.stringify(body.goals),
        goalsText: body.goalsText,
        targetRatio: body.targetRatio,
        customRatio: body.customRatio,
        expectations: body.expectations,
        plan: JSON.stringify(body.plan),
        recordedById: req.user!.id,
        updatedAt: now,
      };
      if (existing) await repo.update({ id: existing.id }, fields);
      else await repo.insert({ id: newId(), visitId: visit.id, patientId: visit.patientId, createdAt: now, ...fields });
      const saved = await repo.findOneByOrFail({ visitId: visit.id });
      // The chosen ratio becomes the patient's target, which the measurements compare against.
      const target = body.targetRatio === null ? undefined : body.targetRatio === 'custom' ? body.customRatio! : LIP_RATIO_PRESETS.find((p) => p.key === body.targetRatio)!.value;
      if (target !== undefined) {
        const before = await tx.getRepository(Patient).findOne({ where: { id: visit.patientId }, select: { id: true, lipRatioTarget: true } });
        if (before?.lipRatioTarget !== target) {
          await tx.getRepository(Patient).update({ id: visit.patientId }, { lipRatioTarget: target, updatedAt: now });
          await audit(tx, req, { action: 'patient.lip-ratio-target', patientId: visit.patientId, targetType: 'patient', targetId: visit.patientId, details: { from: before?.lipRatioTarget ?? null, to: target, consultationId: saved.id } });
        }
      }
      await audit(tx, req, {
        action: existing ? 'consultation.edit' : 'consultation.create',
        patientId: visit.patientId,
        targetType: 'consultation',
        targetId: saved.id,
        details: { visitId: visit.id, targetRatio: body.targetRatio, stages: body.plan.length },
      });
      return { row: saved, created: !existing };
    });
    res.status(created ? 201 : 200).json(consultationView(row));
  });
}
