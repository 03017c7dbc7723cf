import { createHash } from 'node:crypto';
import zlib from 'node:zlib';
import sharp from 'sharp';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { MAX_UPLOAD_BYTES } from '../../server/features/photos/photos.schemas.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { bucketKeys, patientWithVisit, photoLikeJpeg, photoRows, upload } from '../helpers/photos.js';

/**
 * A real decompression bomb: a valid PNG (PNG spec, W3C 2003: IHDR, IDAT as zlib, IEND with CRC-32) declaring
 * 20 000 × 20 000 one-bit grey pixels whose 50 MB of zero rows deflate to a few tens of kilobytes.
 */
function pngBomb(width = 20_000, height = 20_000): Buffer {
  const chunk = (type: string, data: Buffer) => {
    const len = Buffer.alloc(4);
    len.writeUInt32BE(data.length);
    const body = Buffer.concat([Buffer.from(type, 'ascii'), data]);
    const crc = Buffer.alloc(4);
    crc.writeUInt32BE(zlib.crc32(body));
    return Buffer.concat([len, body, crc]);
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr.set([1, 0, 0, 0, 0], 8); // bit depth 1, greyscale, deflate, adaptive filtering, no interlace
  const rows = Buffer.alloc(height * (1 + Math.ceil(width / 8)));
  return Buffer.concat([
    Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]),
    chunk('IHDR', ihdr),
    chunk('IDAT', zlib.deflateSync(rows, { level: 9 })),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

let t: TestApp;
let practitioner: Client;
let practitionerId: string;
let coordinator: Client;
let admin: Client;
beforeAll(async () => {
  t = await makeTestApp();
  const p = await signedIn(t, 'practitioner');
  practitioner = p.client;
  practitionerId = p.user.id;
  coordinator = (await signedIn(t, 'coordinator')).client;
  admin = (await signedIn(t, 'admin')).client;
});
afterAll(() => t.close());
afterEach(() => {
  vi.restoreAllMocks();
});

async function snapshot() {
  return { keys: await bucketKeys(t), rows: (await photoRows(t)).map((p) => p.id) };
}

describe('bad uploads: a clear 4xx and nothing stored', () => {
  it('refuses each bad upload without adding an object or a row', async () => {
    const { visit, patient } = await patientWithVisit(t, practitioner, practitionerId);
    const other = await createPatient(t.db, { code: 'T-OTHER1' });
    const good = await photoLikeJpeg(1600, 1200, 1);
    const truncated = good.subarray(0, Math.floor(good.length * 0.6));
    const bomb = pngBomb();
    expect(bomb.length).toBeLessThan(1_000_000);
    // The bomb's header really declares 400 megapixels (read without decoding).
    const bombMeta = await sharp(bomb, { limitInputPixels: false }).metadata();
    expect([bombMeta.width, bombMeta.height]).toEqual([20_000, 20_000]);
    const oversize = Buffer.concat([good, Buffer.alloc(MAX_UPLOAD_BYTES + 1 - good.length, 7)]);

    const cases: { name: string; send: () => ReturnType<typeof upload>; status: number; code: string }[] = [
      { name: 'text file named .jpg', send: () => upload(practitioner, visit.id, Buffer.from('Not a photo, just some text.\n'.repeat(40)), { view: 'frontal-rest' }, 'IMG_0001.jpg'), status: 415, code: 'NOT_AN_IMAGE' },
      { name: 'truncated JPEG', send: () => upload(practitioner, visit.id, truncated, { view: 'frontal-rest' }), status: 422, code: 'IMAGE_DAMAGED' },
      { name: 'zero-byte file', send: () => upload(practitioner, visit.id, Buffer.alloc(0), { view: 'frontal-rest' }), status: 400, code: 'EMPTY_FILE' },
      { name: '20000 × 20000 PNG bomb', send: () => upload(practitioner, visit.id, bomb, { view: 'frontal-rest' }, 'bomb.png'), status: 422, code: 'TOO_MANY_PIXELS' },
      { name: 'file over the size limit', send: () => upload(practitioner, visit.id, oversize, { view: 'frontal-rest' }), status: 413, code: 'FILE_TOO_LARGE' },
      { name: 'missing view', send: () => upload(practitioner, visit.id, good, {}), status: 400, code: 'VALIDATION_FAILED' },
      { name: 'unknown view', send: () => upload(practitioner, visit.id, good, { view: 'back-of-head' }), status: 400, code: 'UNKNOWN_VIEW' },
      { name: 'visit of another patient', send: () => upload(practitioner, visit.id, good, { view: 'frontal-rest', patientId: other.id }), status: 409, code: 'VISIT_OF_ANOTHER_PATIENT' },
      { name: "coordinator's upload", send: () => upload(coordinator, visit.id, good, { view: 'frontal-rest', patientId: patient.id }), status: 403, code: 'FORBIDDEN' },
      { name: 'no file at all', send: () => practitioner.post(`/api/visits/${visit.id}/photos`).field('view', 'frontal-rest'), status: 400, code: 'NO_FILE' },
      { name: 'file in another field', send: () => practitioner.post(`/api/visits/${visit.id}/photos`).field('view', 'frontal-rest').attach('image', good, 'a.jpg'), status: 400, code: 'BAD_UPLOAD' },
    ];
    const before = await snapshot();
    expect(before.rows).toEqual([]);
    for (const c of cases) {
      const res = await c.send();
      expect(res.status, `${c.name}: ${JSON.stringify(res.body)}`).toBe(c.status);
      expect(res.body.error.code, c.name).toBe(c.code);
      expect(res.body.error.message.length, c.name).toBeGreaterThan(10);
      expect(await snapshot(), c.name).toEqual(before);
    }
    // The same good file is accepted, so each refusal above was about its own fault.
    const ok = await upload(practitioner, visit.id, good, { view: 'frontal-rest', patientId: patient.id });
    expect(ok.status).toBe(201);
  });

  it('refuses a visit that does not exist', async () => {
    const res = await upload(practitioner, '00000000-0000-4000-8000-000000000000', await photoLikeJpeg(64, 64), { view: 'frontal-rest' });
    expect(res.status).toBe(404);
  });
});

describe('storage faults leave neither a row nor an object', () => {
  it('answers 503 while the object store is down, and the next upload after it is back works', async () => {
    const { visit } = await patientWithVisit(t, practitioner, practitionerId);
    const before = await snapshot();
    await t.s3.close();
    const res = await upload(practitioner, visit.id, await photoLikeJpeg(800, 600, 2), { view: 'frontal-rest' });
    expect(res.status).toBe(503);
    expect(res.body.error.code).toBe('SERVICE_UNAVAILABLE');
    expect((await photoRows(t)).map((p) => p.id)).toEqual(before.rows);

    await t.restartS3();
    expect(await snapshot()).toEqual(before);
    const again = await upload(practitioner, visit.id, await photoLikeJpeg(800, 600, 2), { view: 'frontal-rest' });
    expect(again.status).toBe(201);
    expect((await bucketKeys(t)).length).toBe(before.keys.length + 5);
  });

  it('deletes the objects already written when a later write fails', async () => {
    const { visit } = await patientWithVisit(t, practitioner, practitionerId);
    const before = await snapshot();
    const realPut = t.deps.storage.put;
    let calls = 0;
    vi.spyOn(t.deps.storage, 'put').mockImplementation(async (key, body, type) => {
      calls += 1;
      if (calls === 3) throw Object.assign(new Error('connect ECONNREFUSED'), { code: 'ECONNREFUSED' });
      return realPut(key, body, type);
    });
    const res = await upload(practitioner, visit.id, await photoLikeJpeg(800, 600, 3), { view: 'frontal-rest' });
    expect(res.status).toBeGreaterThanOrEqual(500);
    expect(calls).toBe(5);
    expect(await snapshot()).toEqual(before);
  });

  it('deletes the written objects when the database write fails', async () => {
    const { visit } = await patientWithVisit(t, practitioner, practitionerId);
    const before = await snapshot();
    vi.spyOn(t.db, 'transaction').mockRejectedValueOnce(new Error('SQLITE_FULL: database or disk is full'));
    const res = await upload(practitioner, visit.id, await photoLikeJpeg(800, 600, 4), { view: 'frontal-rest' });
    expect(res.status).toBe(500);
    expect(await snapshot()).toEqual(before);
  });
});

describe('duplicates and retakes', () => {
  it('answers the same file to the same view with the existing photo, and keeps a retaken photo as replaced', async () => {
    const { visit } = await patientWithVisit(t, practitioner, practitionerId);
    const first = await photoLikeJpeg(900, 700, 5);
    const retake = await photoLikeJpeg(900, 700, 6);

    const a = await upload(practitioner, visit.id, first, { view: 'lips-rest' });
    expect(a.status).toBe(201);
    const afterFirst = await snapshot();
    const again = await upload(practitioner, visit.id, first, { view: 'lips-rest' }, 'copy-of-photo.jpg');
    expect(again.status).toBe(200);
    expect(again.body.id).toBe(a.body.id);
    expect(await snapshot()).toEqual(afterFirst);

    // The same file for another view is a different photo (the practitioner decides what it shows).
    const otherView = await upload(practitioner, visit.id, first, { view: 'lips-pucker' });
    expect(otherView.status).toBe(201);

    const b = await upload(practitioner, visit.id, retake, { view: 'lips-rest' });
    expect(b.status).toBe(201);
    const current = (await practitioner.get(`/api/visits/${visit.id}/photos`)).body as { id: string; viewKey: string }[];
    expect(current.filter((p) => p.viewKey === 'lips-rest').map((p) => p.id)).toEqual([b.body.id]);
    const all = (await practitioner.get(`/api/visits/${visit.id}/photos?all=1`)).body as { id: string; state: string; replacedById: string | null }[];
    const old = all.find((p) => p.id === a.body.id)!;
    expect(old.state).toBe('replaced');
    expect(old.replacedById).toBe(b.body.id);
    // The replaced photo is kept, objects and all.
    const oldFile = await practitioner.get(`/api/photos/${a.body.id}/file?variant=master`).buffer(true);
    expect(oldFile.status).toBe(200);
    expect(createHash('sha256').update(oldFile.body).digest('hex')).toBe(a.body.sha256);

    const back = await upload(practitioner, visit.id, first, { view: 'lips-rest' });
    expect(back.status).toBe(409);
    expect(back.body.error.code).toBe('REPLACED_DUPLICATE');

    const events = await t.db.getRepository(AuditEvent).findBy({ patientId: visit.patientId });
    expect(events.filter((e) => e.action === 'photo.upload')).toHaveLength(2);
    expect(events.filter((e) => e.action === 'photo.retake')).toHaveLength(1);
  });

  it('stores one photo when the same file arrives twice at once', async () => {
    const { visit } = await patientWithVisit(t, practitioner, practitionerId);
    const bytes = await photoLikeJpeg(1200, 900, 7);
    const [x, y] = await Promise.all([upload(practitioner, visit.id, bytes, { view: 'frontal-rest' }), upload(practitioner, visit.id, bytes, { view: 'frontal-rest' })]);
    expect([x.status, y.status].sort()).toEqual([200, 201]);
    expect(x.body.id).toBe(y.body.id);
    const rows = (await photoRows(t)).filter((p) => p.visitId === visit.id);
    expect(rows).toHaveLength(1);
    const keys = (await bucketKeys(t)).filter((k) => k.includes(visit.id));
    expect(keys).toHaveLength(5);
  });
});

describe('serving photos', () => {
  it('streams each variant with immutable private caching, logs full-size views, and refuses coordinators', async () => {
    const { visit, patient } = await patientWithVisit(t, practitioner, practitionerId);
    const up = await upload(practitioner, visit.id, await photoLikeJpeg(3000, 2000, 8), { view: 'frontal-rest' });
    expect(up.status).toBe(201);
    const id = up.body.id as string;
    expect(up.body.variants.map((v: { variant: string; format: string }) => `${v.variant}/${v.format}`).sort()).toEqual(
      ['display/jpeg', 'display/webp', 'master/jpeg', 'thumb/jpeg', 'thumb/webp'],
    );
    const dims = Object.fromEntries(up.body.variants.map((v: { variant: string; width: number; height: number }) => [v.variant, [v.width, v.height]]));
    expect(dims).toEqual({ master: [3000, 2000], display: [2048, 1365], thumb: [320, 213] });

    const logCount = async () => (await t.db.getRepository(AuditEvent).findBy({ targetId: id, action: 'photo.view' })).length;
    const thumb = await practitioner.get(`/api/photos/${id}/file?variant=thumb`).buffer(true);
    expect(thumb.status).toBe(200);
    expect(thumb.headers['content-type']).toBe('image/webp');
    expect(thumb.headers['cache-control']).toBe('private, max-age=31536000, immutable');
    expect((await sharp(thumb.body).metadata()).format).toBe('webp');
    expect(await logCount()).toBe(0);

    const display = await admin.get(`/api/photos/${id}/file?variant=display&format=jpeg`).buffer(true);
    expect(display.status).toBe(200);
    expect(display.headers['content-type']).toBe('image/jpeg');
    expect((await sharp(display.body).metadata()).width).toBe(2048);
    const master = await practitioner.get(`/api/photos/${id}/file?variant=master`).buffer(true);
    expect(createHash('sha256').update(master.body).digest('hex')).toBe(up.body.sha256);
    expect(await logCount()).toBe(2);
    const log = await t.db.getRepository(AuditEvent).findBy({ targetId: id, action: 'photo.view' });
    expect(log.every((e) => e.patientId === patient.id)).toBe(true);

    const refused = await coordinator.get(`/api/photos/${id}/file?variant=thumb`);
    expect(refused.status).toBe(403);
    expect((await coordinator.get(`/api/patients/${patient.id}/photos`)).status).toBe(403);
    expect(await logCount()).toBe(2);

    const noWebpMaster = await practitioner.get(`/api/photos/${id}/file?variant=master&format=webp`);
    expect(noWebpMaster.status).toBe(400);
    expect(noWebpMaster.body.error.code).toBe('NO_SUCH_VARIANT');
    const badVariant = await practitioner.get(`/api/photos/${id}/file?variant=original`);
    expect(badVariant.status).toBe(400);

    const list = (await practitioner.get(`/api/patients/${patient.id}/photos`)).body as { id: string; visitStartsAt: string }[];
    expect(list.map((p) => p.id)).toEqual([id]);
    expect(list[0].visitStartsAt).toBeTruthy();
    // Storage keys are internal: the API hands out URLs only.
    expect(JSON.stringify(list)).not.toContain('patients/');
  });
});
