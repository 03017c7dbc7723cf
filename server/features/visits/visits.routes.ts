import type { Request, Router } from 'express';
import type { DataSource, EntityManager } from 'typeorm';
import { z } from 'zod';
import { allow, STAFF } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Patient } from '../../entities/patient.js';
import { User } from '../../entities/user.js';
import { Visit } from '../../entities/visit.js';
import { audit, auditListRead, auditPatientRead } from '../../lib/audit.js';
import { badRequest, forbidden, notFound } from '../../lib/errors.js';
import { dayBoundsUtc, dayIn, newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { clinicDayQuerySchema, createVisitSchema, updateVisitSchema } from './visits.schemas.js';
import { getSettings } from '../settings/settings.service.js';

const idParams = z.object({ id: uuidParam });

/** A visit as the API shows it. Coordinators never see clinical notes (DESIGN §2). */
function visitView(v: Visit, req: Request) {
  const { practitioner, patient, notes, ...rest } = v;
  return {
    ...rest,
    notes: req.user?.role === 'coordinator' ? undefined : notes,
    practitionerName: practitioner?.name ?? null,
    patient: patient ? { id: patient.id, code: patient.code, firstName: patient.firstName, lastName: patient.lastName } : undefined,
  };
}

async function assertPractitioner(db: DataSource | EntityManager, id: string) {
  const u = await db.getRepository(User).findOneBy({ id });
  if (!u || !u.active || u.role === 'coordinator') {
    throw badRequest('Choose an active practitioner.', { field: 'practitionerId' });
  }
}

export function registerVisitRoutes(r: Router, { db, config }: Deps): void {
  const visits = db.getRepository(Visit);

  const list = validate({ params: idParams });
  r.get('/api/patients/:id/visits', allow(...STAFF), list, async (req, res) => {
    const { params } = parsed(req, list);
    if (!(await db.getRepository(Patient).existsBy({ id: params.id }))) throw notFound('Patient');
    const rows = await visits.find({ where: { patientId: params.id }, relations: { practitioner: true }, order: { startsAt: 'DESC' } });
    await auditPatientRead(db, req, { action: 'visit.list', patientId: params.id, targetType: 'patient', targetId: params.id });
    res.json(rows.map((v) => visitView(v, req)));
  });

  const create = validate({ params: idParams, body: createVisitSchema });
  r.post('/api/patients/:id/visits', allow(...STAFF), create, async (req, res) => {
    const { params, body } = parsed(req, create);
    if (!(await db.getRepository(Patient).existsBy({ id: params.id }))) throw notFound('Patient');
    if (body.notes && req.user?.role === 'coordinator') throw forbidden('Clinical notes are for clinicians.');
    await assertPractitioner(db, body.practitionerId);
    const now = nowIso();
    const visit = visits.create({
      id: newId(),
      patientId: params.id,
      practitionerId: body.practitionerId,
      startsAt: new Date(body.startsAt).toISOString(),
      kind: body.kind,
      status: 'booked',
      notes: body.notes ?? '',
      createdAt: now,
      updatedAt: now,
    });
    await db.transaction(async (tx) => {
      await tx.getRepository(Visit).insert(visit);
      await audit(tx, req, { action: 'visit.create', patientId: visit.patientId, targetType: 'visit', targetId: visit.id });
    });
    const saved = await visits.findOneOrFail({ where: { id: visit.id }, relations: { practitioner: true } });
    res.status(201).json(visitView(saved, req));
  });

  const one = validate({ params: idParams });
  r.get('/api/visits/:id', allow(...STAFF), one, async (req, res) => {
    const { params } = parsed(req, one);
    const visit = await visits.findOne({ where: { id: params.id }, relations: { practitioner: true, patient: true } });
    if (!visit) throw notFound('Visit');
    await auditPatientRead(db, req, { action: 'visit.view', patientId: visit.patientId, targetType: 'visit', targetId: visit.id });
    res.json(visitView(visit, req));
  });

  const update = validate({ params: idParams, body: updateVisitSchema });
  r.patch('/api/visits/:id', allow(...STAFF), update, async (req, res) => {
    const { params, body } = parsed(req, update);
    if (body.notes !== undefined && req.user?.role === 'coordinator') throw forbidden('Clinical notes are for clinicians.');
    const visit = await visits.findOneBy({ id: params.id });
    if (!visit) throw notFound('Visit');
    if (body.practitionerId) await assertPractitioner(db, body.practitionerId);
    Object.assign(visit, body, body.startsAt ? { startsAt: new Date(body.startsAt).toISOString() } : {}, { updatedAt: nowIso() });
    await db.transaction(async (tx) => {
      await tx.getRepository(Visit).save(visit);
      await audit(tx, req, { action: 'visit.edit', patientId: visit.patientId, targetType: 'visit', targetId: visit.id, details: { fields: Object.keys(body) } });
    });
    const saved = await visits.findOneOrFail({ where: { id: visit.id }, relations: { practitioner: true } });
    res.json(visitView(saved, req));
  });

  const day = validate({ query: clinicDayQuerySchema });
  r.get('/api/clinic-day', allow(...STAFF), day, async (req, res) => {
    const { query } = parsed(req, day);
    const { timeZone } = await getSettings(db, config);
    const date = query.date ?? dayIn(timeZone);
    const { start, end } = dayBoundsUtc(date, timeZone);
    await auditListRead(db, req, 'clinic-day', { date });
    const rows = await visits
      .createQueryBuilder('v')
      .leftJoinAndSelect('v.patient', 'patient')
      .leftJoinAndSelect('v.practitioner', 'practitioner')
      .where('v.startsAt >= :start AND v.startsAt < :end', { start, end })
      .orderBy('v.startsAt', 'ASC')
      .getMany();
    const byPractitioner = new Map<string, { practitionerId: string; practitionerName: string; visits: ReturnType<typeof visitView>[] }>();
    for (const v of rows) {
      const group = byPractitioner.get(v.practitionerId) ?? { practitionerId: v.practitionerId, practitionerName: v.practitioner?.name ?? '', visits: [] };
      group.visits.push(visitView(v, req));
      byPractitioner.set(v.practitionerId, group);
    }
    res.json({ date, timeZone, practitioners: [...byPractitioner.values()] });
  });
}
