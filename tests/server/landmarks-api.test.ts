import sharp from 'sharp';
import { ssim } from 'ssim.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { Photo } from '../../server/entities/photo.js';
import { AlignmentWorker, alignmentWorkerFor } from '../../server/features/landmarks/alignment-worker.js';
import { makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { patientWithVisit, photoLikeJpeg, upload } from '../helpers/photos.js';
import { renderSyntheticFace } from '../fixtures/synthetic-face.js';

let t: TestApp;
let doc: Client;
let docId: string;

beforeAll(async () => {
  t = await makeTestApp();
  const s = await signedIn(t, 'practitioner');
  doc = s.client;
  docId = s.user.id;
}, 60_000);
afterAll(async () => {
  await alignmentWorkerFor(t.deps).idle();
  await t.close();
});

const idle = () => alignmentWorkerFor(t.deps).idle();

async function newVisit(patientId?: string) {
  if (!patientId) return patientWithVisit(t, doc, docId);
  const res = await doc.post(`/api/patients/${patientId}/visits`).send({ startsAt: new Date(Date.now() + Math.random() * 1e8).toISOString(), kind: 'review', practitionerId: docId });
  return { patient: { id: patientId }, visit: res.body as { id: string } };
}

async function file(url: string) {
  const res = await doc.get(url).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on('data', (c: Buffer) => chunks.push(c));
    r.on('end', () => cb(null, Buffer.concat(chunks)));
  });
  expect(res.status).toBe(200);
  return res.body as Buffer;
}

async function rgba(buf: Buffer) {
  const { data, info } = await sharp(buf).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
  return { data: new Uint8ClampedArray(data.buffer, data.byteOffset, data.length), width: info.width, height: info.height };
}

describe('automatic landmarks and alignment after upload', () => {
  let photoId: string;
  let patientId: string;

  it('answers the upload at once with the photo "aligning", then aligns it in the background', async () => {
    const face = await renderSyntheticFace({ format: 'jpeg' });
    const { patient, visit } = await newVisit();
    patientId = patient.id;
    const res = await upload(doc, visit.id, face.data, { view: 'frontal-rest' });
    expect(res.status).toBe(201);
    expect(res.body.alignmentState).toBe('aligning');
    expect(res.body.variants.map((v: { variant: string }) => v.variant)).not.toContain('aligned');
    photoId = res.body.id;

    await idle();
    const lm = await doc.get(`/api/photos/${photoId}/landmarks`);
    expect(lm.status).toBe(200);
    expect(lm.body.alignmentState).toBe('aligned');
    expect(lm.body.landmarks.source).toBe('auto');
    expect(lm.body.landmarks.points).toHaveLength(68);
    expect(lm.body.landmarks.score).toBeGreaterThan(0.5);
    expect(lm.body.alignment.matrix).toHaveLength(2);
    expect(lm.body.view.anchors.map((a: { key: string }) => a.key)).toEqual(['right-eye-centre', 'left-eye-centre']);
    expect(lm.body.measurements.ratio).toBeGreaterThan(0.5);

    const aligned = await file(lm.body.aligned.url);
    const meta = await sharp(aligned).metadata();
    expect([meta.format, meta.width, meta.height]).toEqual(['webp', 1200, 1500]);
    const list = await doc.get(`/api/visits/${(await t.db.getRepository(Photo).findOneByOrFail({ id: photoId })).visitId}/photos`);
    expect(list.body[0].alignmentState).toBe('aligned');
    expect(list.body[0].variants.filter((v: { variant: string }) => v.variant === 'aligned')).toHaveLength(2);
  });

  it('keeps a photo without a face usable and marks it "needs-landmarks"', async () => {
    const { visit } = await newVisit(patientId);
    const res = await upload(doc, visit.id, await photoLikeJpeg(900, 700, 3), { view: 'frontal-rest' });
    expect(res.status).toBe(201);
    await idle();
    const lm = await doc.get(`/api/photos/${res.body.id}/landmarks`);
    expect(lm.body.alignmentState).toBe('needs-landmarks');
    expect(lm.body.alignmentNote).toMatch(/No face was found/);
    expect(lm.body.aligned).toBeNull();
    expect((await doc.get(`/api/photos/${res.body.id}/file?variant=display&format=webp`)).status).toBe(200);

    // Anchors placed by hand align it.
    const put = await doc.put(`/api/photos/${res.body.id}/landmarks`).send({ anchors: [[380, 300], [520, 310]] });
    expect(put.status).toBe(200);
    expect(put.body.alignmentState).toBe('aligned');
    expect(put.body.landmarks.source).toBe('manual');
    expect(put.body.landmarks.anchors).toEqual([[380, 300], [520, 310]]);
    expect(put.body.alignment.residual).toBeCloseTo(0, 6);
    const events = await t.db.getRepository(AuditEvent).findBy({ action: 'photo.landmarks.edit', targetId: res.body.id });
    expect(events).toHaveLength(1);
  });

  it('asks for anchors by hand on a profile view without running the face model', async () => {
    const face = await renderSyntheticFace({ format: 'jpeg' });
    const { visit } = await newVisit(patientId);
    const res = await upload(doc, visit.id, face.data, { view: 'lateral-left' });
    await idle();
    const lm = await doc.get(`/api/photos/${res.body.id}/landmarks`);
    expect(lm.body.alignmentState).toBe('needs-landmarks');
    expect(lm.body.view.anchors).toHaveLength(3);
    expect(lm.body.landmarks).toBeNull();
  });

  it('rejects bad landmarks with a 400 and changes nothing', async () => {
    const before = await t.db.getRepository(Photo).findOneByOrFail({ id: photoId });
    const events = await t.db.getRepository(AuditEvent).countBy({ targetId: photoId });
    const pts = (before.landmarks!.points as [number, number][]).map((p) => [...p]);
    const cases: [string, unknown, string][] = [
      ['outside the image', { points: pts.map((p, i) => (i === 5 ? [801, 20] : p)) }, 'INVALID_LANDMARKS'],
      ['wrong count', { points: pts.slice(0, 60) }, 'INVALID_LANDMARKS'],
      ['coinciding anchors', { anchors: [[300, 300], [301, 300]] }, 'INVALID_LANDMARKS'],
      ['not a number', { anchors: [[300, 300], ['NaN', 300]] }, 'VALIDATION_FAILED'],
      ['null coordinate (NaN in JSON)', { anchors: [[300, 300], [null, 300]] }, 'VALIDATION_FAILED'],
      ['unknown field', { points: pts, extra: 1 }, 'VALIDATION_FAILED'],
    ];
    for (const [what, body, code] of cases) {
      const res = await doc.put(`/api/photos/${photoId}/landmarks`).send(body as object);
      expect(res.status, what).toBe(400);
      expect(res.body.error.code, what).toBe(code);
      expect(res.body.error.message).toBeTruthy();
    }
    const after = await t.db.getRepository(Photo).findOneByOrFail({ id: photoId });
    expect(after.landmarksRev).toBe(before.landmarksRev);
    expect(after.landmarks).toEqual(before.landmarks);
    expect(after.alignmentState).toBe('aligned');
    expect(await t.db.getRepository(AuditEvent).countBy({ targetId: photoId })).toBe(events);
  });

  it('marks edits as manual, realigns, and resets to the automatic landmarks', async () => {
    const before = await doc.get(`/api/photos/${photoId}/landmarks`);
    const pts = before.body.landmarks.points as [number, number][];
    // Move the whole left eye 12 px down: the eye line tilts, so the transform's angle changes.
    const moved = pts.map((p, i) => (i >= 42 && i < 48 ? [p[0], p[1] + 12] : p));
    const put = await doc.put(`/api/photos/${photoId}/landmarks`).send({ points: moved });
    expect(put.status).toBe(200);
    expect(put.body.landmarks.source).toBe('manual');
    expect(put.body.alignmentState).toBe('aligned');
    expect(put.body.alignment.rev).toBeGreaterThan(before.body.alignment.rev);
    expect(put.body.aligned.url).not.toBe(before.body.aligned.url);
    expect(put.body.alignment.angleDeg).not.toBeCloseTo(before.body.alignment.angleDeg, 1);

    const reset = await doc.post(`/api/photos/${photoId}/landmarks/reset`).send({});
    expect(reset.status).toBe(200);
    expect(reset.body.landmarks.source).toBe('auto');
    expect(reset.body.alignment.angleDeg).toBeCloseTo(before.body.alignment.angleDeg, 6);
  });

  it('picks up photos left "aligning" when a new worker starts (nothing lost on restart)', async () => {
    const repo = t.db.getRepository(Photo);
    await repo.update({ id: photoId }, { alignmentState: 'aligning', landmarks: null, alignment: null });
    const restarted = new AlignmentWorker(t.deps);
    await restarted.resume();
    await restarted.idle();
    const row = await repo.findOneByOrFail({ id: photoId });
    expect(row.alignmentState).toBe('aligned');
    expect(row.landmarks?.source).toBe('auto');
  });
});

describe('pairs across visits', () => {
  it('returns the view across visits in time order; the aligned pair lines up (SSIM, Wang et al. 2004)', async () => {
    const first = await renderSyntheticFace({ format: 'jpeg' });
    const later = await renderSyntheticFace({ format: 'jpeg', upperLip: 24, lowerLip: 34, transform: { scale: 0.85, angleDeg: -9, translate: [120, 40] } });
    const { patient, visit } = await newVisit();
    const a = await upload(doc, visit.id, first.data, { view: 'frontal-rest' });
    const v2 = await newVisit(patient.id);
    const b = await upload(doc, v2.visit.id, later.data, { view: 'frontal-rest' });
    await idle();

    const res = await doc.get(`/api/patients/${patient.id}/pairs?view=frontal-rest`);
    expect(res.status).toBe(200);
    expect(res.body.photos.map((p: { photoId: string }) => p.photoId)).toEqual([a.body.id, b.body.id]);
    expect(res.body.baselinePhotoId).toBe(a.body.id);
    for (const p of res.body.photos) expect(p.alignmentState).toBe('aligned');

    const [x, y] = await Promise.all(res.body.photos.map((p: { aligned: { url: string } }) => file(p.aligned.url)));
    const aligned = ssim(await rgba(x), await rgba(y)).mssim;
    const unaligned = ssim(await rgba(first.data), await rgba(later.data)).mssim;
    // Automatic landmarks on both (not the exact drawn anchors) and fuller lips at the later visit: about 0.89 here.
    expect(aligned).toBeGreaterThan(0.85);
    expect(aligned).toBeGreaterThan(unaligned + 0.1);

    expect((await doc.get(`/api/patients/${patient.id}/pairs`)).status).toBe(400);
    expect((await doc.get(`/api/patients/00000000-0000-4000-8000-000000000000/pairs?view=frontal-rest`)).status).toBe(404);
  });
});

describe('measurements and the target ratio', () => {
  it('measures hand-placed landmarks, reports the change since the baseline visit, and shows the target', async () => {
    // The hand-built face of the measurement unit test: IPD 200 px, upper 20 px, lower 40 px (ratio 1:2).
    const base = Array.from({ length: 68 }, (_, i) => [100 + i, 100] as [number, number]);
    const eye = (start: number, cx: number) =>
      [[-30, 0], [-15, -10], [15, -10], [30, 0], [15, 10], [-15, 10]].forEach((o, k) => (base[start + k] = [cx + o[0], 400 + o[1]]));
    eye(36, 300);
    eye(42, 500);
    const lips: Record<number, [number, number]> = {
      48: [310, 700], 49: [350, 680], 50: [380, 670], 51: [400, 680], 52: [420, 670], 53: [450, 680], 54: [490, 700],
      55: [450, 725], 56: [425, 738], 57: [400, 740], 58: [375, 738], 59: [350, 725],
      60: [320, 700], 61: [360, 700], 62: [400, 700], 63: [440, 700], 64: [480, 700], 65: [440, 700], 66: [400, 700], 67: [360, 700],
    };
    for (const [i, q] of Object.entries(lips)) base[Number(i)] = q;
    const fuller = base.map((p, i) => (i === 51 ? [400, 676] : p)) as [number, number][];

    const { patient, visit } = await newVisit();
    const v2 = await newVisit(patient.id);
    const p1 = await upload(doc, visit.id, await photoLikeJpeg(800, 1000, 1), { view: 'frontal-rest' });
    const p2 = await upload(doc, v2.visit.id, await photoLikeJpeg(800, 1000, 2), { view: 'frontal-rest' });
    await idle();
    const m1 = await doc.put(`/api/photos/${p1.body.id}/landmarks`).send({ points: base, ruler: { a: [100, 900], b: [300, 900], lengthMm: 50 } });
    expect(m1.status).toBe(200);
    // By hand: upper 20 px, lower 40 px → 1:2; ruler 50 mm over 200 px → 0.25 mm/px → 5 mm and 10 mm.
    expect(m1.body.measurements.ratio).toBeCloseTo(2, 9);
    expect(m1.body.measurements.upperHeight.mm).toBeCloseTo(5, 9);
    expect(m1.body.measurements.scale.source).toBe('ruler');
    await doc.put(`/api/photos/${p2.body.id}/landmarks`).send({ points: fuller });

    const target = await doc.patch(`/api/patients/${patient.id}/lip-ratio-target`).send({ target: '1:1.6' });
    expect(target.status).toBe(200);
    expect(target.body.target).toMatchObject({ key: '1:1.6', value: 1.6 });
    expect((await doc.patch(`/api/patients/${patient.id}/lip-ratio-target`).send({ target: 'custom' })).status).toBe(400);
    expect((await doc.patch(`/api/patients/${patient.id}/lip-ratio-target`).send({ target: 'custom', value: 9 })).status).toBe(400);
    // The front desk never sees the target on the patient record.
    const desk = (await signedIn(t, 'coordinator')).client;
    expect((await desk.get(`/api/patients/${patient.id}`)).body).not.toHaveProperty('lipRatioTarget');

    const res = await doc.get(`/api/patients/${patient.id}/measurements`);
    expect(res.status).toBe(200);
    expect(res.body.target.key).toBe('1:1.6');
    expect(res.body.caution).toMatch(/not treatment targets/);
    const view = res.body.views.find((v: { viewKey: string }) => v.viewKey === 'frontal-rest');
    expect(view.rows.map((r: { photoId: string }) => r.photoId)).toEqual([p1.body.id, p2.body.id]);
    // Upper height 20 → 24 px at the same IPD: +20 %; the ratio goes from 1:2 to 1:(40/24).
    expect(view.rows[1].change.upperHeight.pct).toBeCloseTo(20, 9);
    expect(view.rows[1].change.ratio.to).toBeCloseTo(40 / 24, 9);

    const rebased = await doc.get(`/api/patients/${patient.id}/measurements?baseline=${v2.visit.id}`);
    const rv = rebased.body.views.find((v: { viewKey: string }) => v.viewKey === 'frontal-rest');
    expect(rv.baselinePhotoId).toBe(p2.body.id);
    expect(rv.rows[0].change.upperHeight.pct).toBeCloseTo(((20 - 24) / 24) * 100, 9);
  });
});
