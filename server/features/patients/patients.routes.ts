import type { Router } from 'express';
import { z } from 'zod';
import { allow, STAFF } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Patient } from '../../entities/patient.js';
import { audit, auditListRead } from '../../lib/audit.js';
import { notFound } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { patientInputSchema, patientListQuerySchema, patientUpdateSchema } from './patients.schemas.js';
import { nextPatientCode, searchPatients } from './patients.service.js';

const idParams = z.object({ id: uuidParam });

export function registerPatientRoutes(r: Router, { db, config }: Deps): void {
  const patients = db.getRepository(Patient);

  const list = validate({ query: patientListQuerySchema });
  r.get('/api/patients', allow(...STAFF), list, async (req, res) => {
    const { query } = parsed(req, list);
    const found = await searchPatients(db, { q: query.q, page: query.page, pageSize: query.pageSize, archived: query.archived === '1' });
    await auditListRead(db, req, 'patient-search', { q: query.q ?? null, archived: query.archived === '1' });
    res.json(found);
  });

  const create = validate({ body: patientInputSchema });
  r.post('/api/patients', allow(...STAFF), create, async (req, res) => {
    const { body } = parsed(req, create);
    const patient = await db.transaction(async (tx) => {
      const now = nowIso();
      const row = tx.getRepository(Patient).create({
        id: newId(),
        code: await nextPatientCode(tx, config.patientCodePrefix),
        firstName: body.firstName,
        lastName: body.lastName,
        dateOfBirth: body.dateOfBirth,
        email: body.email ?? null,
        phone: body.phone ?? null,
        archived: false,
        createdAt: now,
        updatedAt: now,
      });
      await tx.getRepository(Patient).insert(row);
      await audit(tx, req, { action: 'patient.create', patientId: row.id, targetType: 'patient', targetId: row.id });
      return row;
    });
    res.status(201).json(patient);
  });

  const one = validate({ params: idParams });
  r.get('/api/patients/:id', allow(...STAFF), one, async (req, res) => {
    const { params } = parsed(req, one);
    const patient = await patients.findOneBy({ id: params.id });
    if (!patient) throw notFound('Patient');
    await audit(db, req, { action: 'patient.view', patientId: patient.id, targetType: 'patient', targetId: patient.id });
    res.json(patient);
  });

  const update = validate({ params: idParams, body: patientUpdateSchema });
  r.patch('/api/patients/:id', allow(...STAFF), update, async (req, res) => {
    const { params, body } = parsed(req, update);
    const patient = await db.transaction(async (tx) => {
      const row = await tx.getRepository(Patient).findOneBy({ id: params.id });
      if (!row) throw notFound('Patient');
      const changed = Object.keys(body).filter((k) => (row as unknown as Record<string, unknown>)[k] !== (body as Record<string, unknown>)[k]);
      Object.assign(row, body, { updatedAt: nowIso() });
      await tx.getRepository(Patient).save(row);
      await audit(tx, req, { action: 'patient.edit', patientId: row.id, targetType: 'patient', targetId: row.id, details: { fields: changed } });
      return row;
    });
    res.json(patient);
  });
}
