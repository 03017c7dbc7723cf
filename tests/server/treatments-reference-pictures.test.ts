import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { Photo } from '../../server/entities/photo.js';
import { ReferencePicture } from '../../server/entities/reference-picture.js';
import type { User } from '../../server/entities/user.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { exiftoolRead, exiftoolWrite, photoLikeJpeg } from '../helpers/photos.js';
import { createVisit } from '../helpers/treatments.js';

let t: TestApp;
let prac: Client;
let practitioner: User;

beforeAll(async () => {
  t = await makeTestApp();
  ({ client: prac, user: practitioner } = await signedIn(t, 'practitioner'));
});
afterAll(() => t.close());

const send = (patientId: string, bytes: Buffer, fields: Record<string, string> = {}, filename = 'lips-i-like.jpg') => {
  let req = prac.post(`/api/patients/${patientId}/reference-pictures`);
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
  return req.attach('picture', bytes, { filename, contentType: 'image/jpeg' });
};

const keysOf = async (patientId: string) => (await t.deps.storage.list(`patients/${patientId}/`)).sort();

describe("the patient's reference pictures", () => {
  it('are stored upright without metadata, apart from clinical photos, and logged when viewed', async () => {
    const patient = await createPatient(t.db);
    const visit = await createVisit(prac, patient.id, practitioner.id, new Date().toISOString(), 'consultation');
    // GPS and a camera owner name in the upload (Exif 2.3 tags, FACTS 12), and orientation 6 (rotate 90° clockwise, FACTS 11).
    const tagged = await exiftoolWrite(await photoLikeJpeg(800, 600), ['-GPSLatitude=51.5', '-GPSLatitudeRef=N', '-GPSLongitude=0.12', '-GPSLongitudeRef=W', '-CameraOwnerName=Someone', '-Orientation#=6']);
    const res = await send(patient.id, tagged, { caption: 'Soft, natural shape', visitId: visit.id });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ caption: 'Soft, natural shape', visitId: visit.id, width: 600, height: 800 });

    const keys = await keysOf(patient.id);
    expect(keys).toEqual([`patients/${patient.id}/reference-pictures/${res.body.id}/display.jpg`, `patients/${patient.id}/reference-pictures/${res.body.id}/thumb.jpg`]);
    const stored = await t.deps.storage.get(keys[0]);
    const tags = await exiftoolRead(stored);
    expect(Object.keys(tags).filter((k) => /GPS|OwnerName|Orientation/.test(k))).toEqual([]);
    expect((await sharp(stored).metadata()).width).toBe(600);

    // Not a clinical photo: no Photo row, not in the patient's photos.
    expect(await t.db.getRepository(Photo).countBy({ patientId: patient.id })).toBe(0);
    expect((await prac.get(`/api/patients/${patient.id}/photos`)).body).toEqual(expect.not.arrayContaining([expect.objectContaining({ id: res.body.id })]));

    const list = await prac.get(`/api/patients/${patient.id}/reference-pictures`);
    expect(list.body.map((p: { id: string }) => p.id)).toEqual([res.body.id]);
    const file = await prac.get(`/api/reference-pictures/${res.body.id}/file`).buffer(true);
    expect(file.status).toBe(200);
    expect(file.headers['content-type']).toBe('image/jpeg');
    expect(await t.db.getRepository(AuditEvent).countBy({ action: 'reference-picture.view', targetId: res.body.id })).toBe(1);
  });

  it('refuses what is not a picture, or a bad caption or visit, and stores nothing', async () => {
    const patient = await createPatient(t.db);
    const other = await createPatient(t.db);
    const otherVisit = await createVisit(prac, other.id, practitioner.id);
    const jpeg = await photoLikeJpeg(400, 300);
    const cases = [
      { send: () => send(patient.id, Buffer.from('not an image at all')), status: 415 },
      { send: () => send(patient.id, jpeg, { caption: 'bell\u0007' }), status: 400 },
      { send: () => send(patient.id, jpeg, { visitId: otherVisit.id }), status: 400 },
      { send: () => prac.post(`/api/patients/${patient.id}/reference-pictures`).field('caption', 'no file'), status: 400 },
    ];
    for (const c of cases) {
      const res = await c.send();
      expect(res.status).toBe(c.status);
      expect(res.body.error.message).toEqual(expect.any(String));
    }
    expect(await keysOf(patient.id)).toEqual([]);
    expect(await t.db.getRepository(ReferencePicture).countBy({ patientId: patient.id })).toBe(0);
  });

  it('can be removed, objects and all', async () => {
    const patient = await createPatient(t.db);
    const res = await send(patient.id, await photoLikeJpeg(400, 300));
    expect((await prac.delete(`/api/reference-pictures/${res.body.id}`)).status).toBe(204);
    expect(await keysOf(patient.id)).toEqual([]);
    expect((await prac.get(`/api/patients/${patient.id}/reference-pictures`)).body).toEqual([]);
    expect((await prac.get(`/api/reference-pictures/${res.body.id}/file`)).status).toBe(404);
  });
});
