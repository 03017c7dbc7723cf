import type { Router } from 'express';
import { ZipArchive } from 'archiver';
import { z } from 'zod';
import { allow, currentUser } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Patient } from '../../entities/patient.js';
import { audit } from '../../lib/audit.js';
import { badRequest, conflict, notFound } from '../../lib/errors.js';
import { nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { patientPrefix } from '../../storage/keys.js';
import { getSettings } from '../settings/settings.service.js';
import { collectPatientRecords } from './patient-records.js';
import { erasePatient } from './erasure.js';
import { erasePatientSchema } from './patient-data.schemas.js';

const idParams = z.object({ id: uuidParam });

const normaliseName = (s: string) => s.normalize('NFC').replace(/\s+/g, ' ').trim().toLocaleLowerCase('en-GB');

/** The first day erasure is allowed: retention years after the last visit (or the record's creation). */
export function erasableFrom(lastActivity: string, retentionYears: number): string {
  const d = new Date(lastActivity);
  d.setUTCFullYear(d.getUTCFullYear() + retentionYears);
  return d.toISOString();
}

export function registerPatientDataRoutes(r: Router, deps: Deps): void {
  const { db, config, storage } = deps;
  const one = validate({ params: idParams });

  /** Everything held about one patient as a ZIP: records as JSON, photos and documents as stored. */
  r.get('/api/patients/:id/export', allow('admin'), one, async (req, res) => {
    const { params } = parsed(req, one);
    const patient = await db.getRepository(Patient).findOneBy({ id: params.id });
    if (!patient) throw notFound('Patient');
    const tables = await collectPatientRecords(db, db.manager, patient.id, { includeAccessLog: true });
    const objects = await storage.listWithSizes(patientPrefix(patient.id));
    await audit(db, req, { action: 'patient.export', patientId: patient.id, targetType: 'patient', targetId: patient.id, details: { objects: objects.length } });

    const estimate = objects.reduce((n, o) => n + o.size, 0) + tables.reduce((n, t) => n + JSON.stringify(t.rows).length, 0);
    res.set({
      'Content-Type': 'application/zip',
      'Content-Disposition': `attachment; filename="${patient.code}-records-${new Date().toISOString().slice(0, 10)}.zip"`,
      // Lets the client show progress; the ZIP is streamed, so its exact length is not known in advance.
      'X-Estimated-Bytes': String(estimate),
    });
    const zip = new ZipArchive({ zlib: { level: 6 } });
    zip.on('warning', (err: Error) => req.log?.warn({ err }, 'export warning'));
    zip.on('error', (err: Error) => res.destroy(err));
    zip.pipe(res);
    zip.append(
      JSON.stringify({ exportedAt: nowIso(), clinic: (await getSettings(db, config)).clinicName, patient: { id: patient.id, code: patient.code }, tables: tables.map((t) => ({ table: t.table, rows: t.rows.length })), files: objects.length }, null, 2),
      { name: 'manifest.json' },
    );
    for (const t of tables) zip.append(JSON.stringify(t.rows, null, 2), { name: `records/${t.table}.json` });
    for (const o of objects) {
      const { body } = await storage.stream(o.key);
      // JPEG, WebP and PDF are already compressed: store them as they are.
      zip.append(body, { name: `files/${o.key.slice(patientPrefix(patient.id).length)}`, store: true });
    }
    await zip.finalize();
  });

  const erase = validate({ params: idParams, body: erasePatientSchema });
  /**
   * Erases a patient: photos, derivatives, documents and records. Only after the admin types the patient's name
   * and only outside the clinical-record retention period. The access log keeps the fact, never the data.
   */
  r.delete('/api/patients/:id', allow('admin'), erase, async (req, res) => {
    const { params, body } = parsed(req, erase);
    const patient = await db.getRepository(Patient).findOneBy({ id: params.id });
    if (!patient) throw notFound('Patient');
    const fullName = `${patient.firstName} ${patient.lastName}`;
    if (normaliseName(body.confirmName) !== normaliseName(fullName)) {
      throw badRequest(`The name typed does not match this patient's record. Type "${fullName}" to confirm.`, { field: 'confirmName' }, 'NAME_MISMATCH');
    }
    const { retentionYears } = await getSettings(db, config);
    const [{ last }] = await db.query(`SELECT max("startsAt") AS last FROM "visit" WHERE "patientId" = ? AND "startsAt" <= ?`, [patient.id, nowIso()]);
    const from = erasableFrom(last ?? patient.createdAt, retentionYears);
    if (from > nowIso()) {
      throw conflict(
        `This record is inside the clinic's retention period (${retentionYears} years after the last visit) and can be erased from ${from.slice(0, 10)}. Check local law and professional guidance before changing the retention setting.`,
        { erasableFrom: from },
        'RETENTION_PERIOD',
      );
    }

    const erased = await erasePatient(deps, { patientId: patient.id, erasedById: currentUser(req).id, reason: body.reason, req });
    res.json({ erased: true, patientId: patient.id, ...erased });
  });
}
