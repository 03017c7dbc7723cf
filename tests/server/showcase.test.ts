import fs from 'node:fs';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ShowcaseRequest } from '../../server/entities/showcase.js';
import { alignmentWorkerFor } from '../../server/features/landmarks/alignment-worker.js';
import { detectLandmarks } from '../../server/media/landmarks.js';
import { boxIsLipsOnly, lipsOnlyCropBox } from '../../server/media/showcase-crop.js';
import { renderPortrait } from '../../server/media/synthetic-portrait.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { answersFor, binary, demoForms, handOver, signaturePng } from '../helpers/consents.js';
import { exiftoolRead, upload } from '../helpers/photos.js';

let t: TestApp;
let admin: Client;
let adminId: string;
let practitioner: Client;
let practitionerId: string;
let forms: Awaited<ReturnType<typeof demoForms>>;

beforeAll(async () => {
  t = await makeTestApp();
  const a = await signedIn(t, 'admin');
  admin = a.client;
  adminId = a.user.id;
  const p = await signedIn(t, 'practitioner');
  practitioner = p.client;
  practitionerId = p.user.id;
  forms = await demoForms(t, adminId);
}, 120_000);
afterAll(() => t.close());

/** A patient with frontal-rest portraits at two visits, aligned by the real pipeline. */
async function patientWithPair(seed: number) {
  const patient = await createPatient(t.db, { firstName: 'Wilhelmina', lastName: `Showcase${seed}` });
  const ids: string[] = [];
  for (const [i, lipVolume] of [0.2, 0.6].entries()) {
    const startsAt = new Date(Date.now() - (30 - i * 21) * 86_400_000).toISOString();
    const visit = await practitioner.post(`/api/patients/${patient.id}/visits`).send({ startsAt, kind: i ? 'review' : 'treatment', practitionerId });
    const bytes = await renderPortrait({ seed, view: 'frontal-rest', lipVolume, shot: i }, { capturedAt: startsAt });
    const up = await upload(practitioner, visit.body.id, bytes, { view: 'frontal-rest' });
    expect(up.status).toBe(201);
    ids.push(up.body.id);
  }
  await alignmentWorkerFor(t.deps).idle();
  return { patient, photoIds: ids };
}

async function signShowcase(patientId: string, channels: string[], crop: 'face' | 'lips-only') {
  const staff = (await signedIn(t, 'practitioner')).client;
  const tablet = await handOver(staff, patientId, [forms.showcase.id]);
  const res = await tablet.post(`/api/handover/forms/${forms.showcase.id}/sign`).send({ answers: answersFor(forms.showcase), channels, crop, signerName: 'Wilhelmina Showcase', signature: await signaturePng() });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.consentId as string;
}

const requestBody = (photoIds: string[], channels: string[]) => ({ viewKey: 'frontal-rest', photoIds, channels });

describe('showcase requests need a matching, current consent', () => {
  // HIPAA 45 CFR 164.508(a)(3): marketing use needs its own authorization; GDPR Art. 7: specific and demonstrable.
  it('refuses a request without any showcase consent, saying what is missing', async () => {
    const { patient, photoIds } = await patientWithPair(11);
    const res = await practitioner.post(`/api/patients/${patient.id}/showcase-requests`).send(requestBody(photoIds, ['clinic-website']));
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('NO_SHOWCASE_CONSENT');
    expect(await t.db.getRepository(ShowcaseRequest).countBy({ patientId: patient.id })).toBe(0);
  });

  it('refuses channels the consent does not name, and clears only what it covers', async () => {
    const { patient, photoIds } = await patientWithPair(12);
    await signShowcase(patient.id, ['clinic-website'], 'face');
    const res = await practitioner.post(`/api/patients/${patient.id}/showcase-requests`).send(requestBody(photoIds, ['clinic-website', 'social-media']));
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('CHANNEL_NOT_CONSENTED');
    expect(res.body.error.details.channels).toEqual(['social-media']);
    expect(res.body.error.message).toContain('Social media');
    const ok = await practitioner.post(`/api/patients/${patient.id}/showcase-requests`).send(requestBody(photoIds, ['clinic-website']));
    expect(ok.status).toBe(201);
    expect(ok.body.state).toBe('requested');
    // Only an admin clears.
    expect((await practitioner.post(`/api/showcase-requests/${ok.body.id}/clear`).send({})).status).toBe(403);
    const cleared = await admin.post(`/api/showcase-requests/${ok.body.id}/clear`).send({ note: 'Good light, same angle.' });
    expect(cleared.status).toBe(200);
    expect(cleared.body.state).toBe('cleared');
    // A decision is final.
    expect((await admin.post(`/api/showcase-requests/${ok.body.id}/decline`).send({ note: 'changed my mind' })).status).toBe(409);
    await expect(t.db.query(`UPDATE showcase_request SET state = 'requested' WHERE id = ?`, [ok.body.id])).rejects.toThrow(/not allowed/);
  });

  it('refuses clearance when the consent was withdrawn after the request', async () => {
    const { patient, photoIds } = await patientWithPair(13);
    const consentId = await signShowcase(patient.id, ['print'], 'face');
    const req = await practitioner.post(`/api/patients/${patient.id}/showcase-requests`).send(requestBody(photoIds, ['print']));
    expect(req.status).toBe(201);
    expect((await practitioner.post(`/api/consents/${consentId}/withdraw`).send({ reason: 'Patient phoned.' })).status).toBe(200);
    const row = await t.db.getRepository(ShowcaseRequest).findOneByOrFail({ id: req.body.id });
    expect(row.state).toBe('withdrawn');
    expect((await admin.post(`/api/showcase-requests/${req.body.id}/clear`).send({})).status).toBe(409);
  });

  it('refuses photos of another patient or of mixed views', async () => {
    const a = await patientWithPair(14);
    const b = await patientWithPair(15);
    await signShowcase(a.patient.id, ['clinic-website'], 'face');
    const foreign = await practitioner.post(`/api/patients/${a.patient.id}/showcase-requests`).send(requestBody([a.photoIds[0], b.photoIds[1]], ['clinic-website']));
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.code).toBe('UNKNOWN_PHOTO');
    const one = await practitioner.post(`/api/patients/${a.patient.id}/showcase-requests`).send(requestBody([a.photoIds[0]], ['clinic-website']));
    expect(one.status).toBe(400);
  });
});

describe('exports and the withdrawal cascade', () => {
  it('exports a cleared lips-only pair without metadata; withdrawal stops exports and mails the takedown list', async () => {
    const { patient, photoIds } = await patientWithPair(21);
    const consentId = await signShowcase(patient.id, ['clinic-website', 'social-media'], 'lips-only');
    const req = await practitioner.post(`/api/patients/${patient.id}/showcase-requests`).send(requestBody(photoIds, ['clinic-website', 'social-media']));
    expect(req.body.crop).toBe('lips-only');
    await admin.post(`/api/showcase-requests/${req.body.id}/clear`).send({});
    const exp = await admin.post(`/api/showcase-requests/${req.body.id}/exports`).send({ channel: 'social-media' });
    expect(exp.status, JSON.stringify(exp.body)).toBe(201);
    expect(exp.body.files.map((f: { name: string }) => f.name)).toEqual(['composite', 'photo-1', 'photo-2']);
    const file = await binary(admin.get(exp.body.files[0].url));
    expect(file.status).toBe(200);
    fs.mkdirSync('tests/artifacts', { recursive: true });
    fs.writeFileSync('tests/artifacts/showcase-lips-only-composite.jpg', file.body as Buffer);
    const tags = await exiftoolRead(file.body as Buffer);
    // ExifTool (Exif 2.3x tag list): nothing identifying and no EXIF, XMP or IPTC block at all.
    const groups = new Set(Object.keys(tags).map((k) => k.split(':')[0]));
    for (const g of ['IFD0', 'ExifIFD', 'GPS', 'XMP-x', 'IPTC', 'ICC-header']) expect(groups.has(g), g).toBe(false);

    expect((await practitioner.post(`/api/consents/${consentId}/withdraw`).send({ reason: 'Patient e-mailed the clinic.' })).status).toBe(200);
    const after = await t.db.getRepository(ShowcaseRequest).findOneByOrFail({ id: req.body.id });
    expect(after.state).toBe('withdrawn');
    const again = await admin.post(`/api/showcase-requests/${req.body.id}/exports`).send({ channel: 'clinic-website' });
    expect(again.status).toBe(409);
    expect((await admin.get(exp.body.files[0].url)).status).toBe(409);

    await t.deps.mailer.runOnce();
    const mails = await t.mails();
    const takedowns = mails.filter((m) => m.subject === 'Showcase consent withdrawn: take down these exports');
    const takedown = takedowns.find((m) => m.text?.includes(exp.body.files[0].sha256.slice(0, 16)));
    expect(takedown, 'a takedown mail listing this export').toBeDefined();
    expect(takedown!.text).toContain('Social media');
    expect(takedown!.to && !Array.isArray(takedown!.to) ? takedown!.to.value.map((v) => v.address) : []).toContain((await admin.get('/api/auth/me')).body.email);
    const queue = await admin.get('/api/showcase-requests').query({ state: 'withdrawn' });
    expect(queue.body.map((r: { id: string }) => r.id)).toContain(req.body.id);
  });
});

describe('lips-only crop', () => {
  // Hand-built face (iBUG 300-W indices, FACTS 5): eyes at y=100, nose tip (30) at y=180,
  // lip corners 48/54 at (120,250)/(200,250), lips from y=232 to y=272.
  const face: ({ x: number; y: number } | null)[] = Array.from({ length: 68 }, () => null);
  for (let i = 36; i <= 47; i++) face[i] = { x: i < 42 ? 90 + (i - 36) * 6 : 200 + (i - 42) * 6, y: 100 + (i % 2) * 4 };
  face[30] = { x: 160, y: 180 };
  for (let i = 48; i <= 67; i++) {
    const t = ((i - 48) % 12) / 12;
    face[i] = { x: 120 + 80 * (0.5 - 0.5 * Math.cos(2 * Math.PI * t)), y: 252 + 20 * Math.sin(2 * Math.PI * t) * (i < 60 ? 1 : 0.4) };
  }
  face[48] = { x: 120, y: 250 };
  face[54] = { x: 200, y: 250 };

  it('contains both lip corners, no eye point, and nothing above the nose tip', () => {
    const box = lipsOnlyCropBox(face, { width: 320, height: 400 })!;
    const inside = (p: { x: number; y: number }) => p.x >= box.left && p.x <= box.left + box.width && p.y >= box.top && p.y <= box.top + box.height;
    expect(inside(face[48]!)).toBe(true);
    expect(inside(face[54]!)).toBe(true);
    expect(box.top).toBeGreaterThan(180);
    expect(face.slice(36, 48).some((p) => inside(p!))).toBe(false);
    expect(boxIsLipsOnly(box, face)).toBe(true);
  });

  it('refuses when the lips are not all placed', () => {
    const missing = face.slice();
    missing[57] = null;
    expect(lipsOnlyCropBox(missing, { width: 320, height: 400 })).toBeNull();
  });
});

describe('lips-only crop on the demo portraits', () => {
  // The invented demo faces go through the real detector; the crop must hold both lip corners (48, 54) and no
  // eye point (36–47), per the iBUG 300-W indices of FACTS 5.
  it('contains both lip corners and no eye landmark for each face', { timeout: 120_000 }, async () => {
    for (const seed of [3, 8, 18]) {
      const image = await renderPortrait({ seed, view: 'frontal-rest', lipVolume: 0.5 });
      const found = await detectLandmarks(image);
      expect(found, `face ${seed}`).not.toBeNull();
      const points = found!.points.map(([x, y]) => ({ x, y }));
      const { width, height } = await sharp(image).metadata();
      const box = lipsOnlyCropBox(points, { width: width!, height: height! })!;
      const inside = (p: { x: number; y: number }) => p.x >= box.left && p.x <= box.left + box.width && p.y >= box.top && p.y <= box.top + box.height;
      expect(inside(points[48]) && inside(points[54]), `lip corners of face ${seed}`).toBe(true);
      expect(points.slice(36, 48).some(inside), `eyes of face ${seed}`).toBe(false);
      expect(box.top).toBeGreaterThan(points[30].y);
    }
  });
});
