import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { MailLog } from '../../server/entities/mail-log.js';
import { Patient } from '../../server/entities/patient.js';
import { Photo } from '../../server/entities/photo.js';
import type { StoredLandmarks } from '../../server/features/landmarks/landmarks.schemas.js';
import { alignmentWorkerFor } from '../../server/features/landmarks/alignment-worker.js';
import { measureLips } from '../../server/media/measurements.js';
import { estimatePose } from '../../server/media/pose.js';
import type { Point } from '../../server/media/umeyama.js';
import { VIEWS } from '../../server/media/views.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { pdfTool, signatureDictionaries } from '../helpers/consents.js';
import { photoLikeJpeg, upload } from '../helpers/photos.js';
import { createVisit } from '../helpers/treatments.js';

const run = promisify(execFile);

/**
 * A frontal face built by hand in the iBUG 300-W order (Sagonas et al. 2016; FACTS 5): eye centres (300, 400) and
 * (500, 400), so IPD = 200 px; closed mouth with the inner lip line at y = 700; labrale superius 51 at y = 700 − upper,
 * labrale inferius 57 at y = 700 + lower. `noseX` moves the nose tip sideways to turn the head (yaw).
 */
function face(upper: number, lower: number, noseX = 400): Point[] {
  const p: Point[] = Array.from({ length: 68 }, (_, i) => [100 + i, 100] as Point);
  const eye = (start: number, cx: number) =>
    ([[-30, 0], [-15, -10], [15, -10], [30, 0], [15, 10], [-15, 10]] as Point[]).forEach((o, k) => (p[start + k] = [cx + o[0], 400 + o[1]]));
  eye(36, 300);
  eye(42, 500);
  p[30] = [noseX, 560];
  p[8] = [400, 900];
  const lips: Record<number, Point> = {
    48: [310, 700], 49: [350, 700 - upper], 50: [380, 690 - upper], 51: [400, 700 - upper], 52: [420, 690 - upper], 53: [450, 700 - upper], 54: [490, 700],
    55: [450, 700 + lower * 0.6], 56: [425, 700 + lower * 0.95], 57: [400, 700 + lower], 58: [375, 700 + lower * 0.95], 59: [350, 700 + lower * 0.6],
    60: [320, 700], 61: [360, 700], 62: [400, 700], 63: [440, 700], 64: [480, 700], 65: [440, 700], 66: [400, 700], 67: [360, 700],
  };
  for (const [i, q] of Object.entries(lips)) p[Number(i)] = q;
  return p;
}

let t: TestApp;
let prac: Client;
let pracId: string;
const DAY = 86_400_000;
const daysAgo = (d: number) => new Date(Date.now() - d * DAY).toISOString();

/** Stores what the alignment step would leave on a photo, computed with the product's own measurement and pose functions. */
async function landmark(photoId: string, points: Point[], state: Photo['alignmentState'] = 'aligned', quality = { sharpness: 120, highlights: 0, shadows: 0, skinLab: [65, 14, 18] as [number, number, number] }) {
  const view = VIEWS['frontal-rest'];
  const landmarks: StoredLandmarks = { source: 'auto', points: points.map((q) => [q[0], q[1]]), anchors: null, ruler: null, score: 0.9, box: null, imageWidth: 800, imageHeight: 1000, editedAt: null, editedById: null };
  await t.db.getRepository(Photo).update(
    { id: photoId },
    {
      alignmentState: state,
      alignmentNote: state === 'needs-landmarks' ? 'No face was found.' : null,
      landmarks,
      // A pure scale ×1.5 and shift: frame = 1.5·display + (0, 20); the overlay test checks it is applied.
      alignment: state === 'aligned' ? { rev: 1, viewKey: 'frontal-rest', frame: view.frame, matrix: [[1.5, 0, 0], [0, 1.5, 20]], scale: 1.5, angleDeg: 0, residual: 0, anchors: [], alignedAt: new Date().toISOString() } : null,
      pose: estimatePose(view, points, null),
      quality,
      measurements: measureLips(points),
    },
  );
}

async function photoAt(patientId: string, days: number, view: string, seed: number): Promise<{ visitId: string; photoId: string }> {
  const visit = await createVisit(prac, patientId, pracId, daysAgo(days), 'review');
  const res = await upload(prac, visit.id, await photoLikeJpeg(800, 1000, seed), { view });
  if (res.status !== 201) throw new Error(`upload: ${res.status} ${JSON.stringify(res.body)}`);
  return { visitId: visit.id, photoId: res.body.id };
}

let patient: Patient;
let base: { visitId: string; photoId: string };
let follow: { visitId: string; photoId: string };
let turned: { visitId: string; photoId: string };
let unaligned: { visitId: string; photoId: string };
let lips: { visitId: string; photoId: string };

beforeAll(async () => {
  t = await makeTestApp();
  const p = await signedIn(t, 'practitioner');
  prac = p.client;
  pracId = p.user.id;
  // A name with letters outside WinAnsi: the sheet must print them (full TTF, subset embedded).
  patient = await createPatient(t.db, { firstName: 'Zoë', lastName: 'Łukasiewicz-Řezníčková', email: 'zoe@mail.example', lipRatioTarget: 1.6 });
  base = await photoAt(patient.id, 60, 'frontal-rest', 1);
  follow = await photoAt(patient.id, 20, 'frontal-rest', 2);
  turned = await photoAt(patient.id, 10, 'frontal-rest', 3);
  unaligned = await photoAt(patient.id, 5, 'frontal-rest', 4);
  lips = await photoAt(patient.id, 20, 'lips-rest', 5);
  // Let the automatic step finish with these faceless test images before the landmarks are written by hand.
  await alignmentWorkerFor(t.deps).idle();
  await landmark(base.photoId, face(20, 40));
  await landmark(follow.photoId, face(30, 40));
  // Nose tip 40 px towards the image's right of the eye midpoint: about 22° of yaw (pose.ts model), far beyond 5°.
  await landmark(turned.photoId, face(30, 40, 440));
  await landmark(unaligned.photoId, face(30, 40), 'needs-landmarks');
});
afterAll(() => t.close());

describe('pairs of a view', () => {
  it('lists the photos of one view in time order, never another view, with alignment state and warnings', async () => {
    const res = await prac.get(`/api/patients/${patient.id}/pairs`).query({ view: 'frontal-rest' });
    expect(res.status).toBe(200);
    const photos = res.body.photos as { photoId: string; visitId: string; visitStartsAt: string; alignmentState: string; warnings: { code: string }[] }[];
    // Visits 60, 20, 10 and 5 days ago: oldest first. The lips close-up of the same day is not among them.
    expect(photos.map((p) => p.photoId)).toEqual([base.photoId, follow.photoId, turned.photoId, unaligned.photoId]);
    expect(photos.map((p) => p.visitStartsAt)).toEqual([...photos.map((p) => p.visitStartsAt)].sort());
    expect(photos.map((p) => p.photoId)).not.toContain(lips.photoId);
    expect(photos.map((p) => p.alignmentState)).toEqual(['aligned', 'aligned', 'aligned', 'needs-landmarks']);
    expect(res.body.baselinePhotoId).toBe(base.photoId);
    expect(photos[2].warnings.map((w) => w.code)).toEqual(expect.arrayContaining(['yaw-view', 'yaw-baseline']));
    expect(photos[1].warnings.map((w) => w.code)).not.toContain('yaw-baseline');
    const other = await prac.get(`/api/patients/${patient.id}/pairs`).query({ view: 'lips-rest' });
    expect(other.body.photos.map((p: { photoId: string }) => p.photoId)).toEqual([lips.photoId]);
  });

  it('is closed to the front desk', async () => {
    const desk = (await signedIn(t, 'coordinator')).client;
    expect((await desk.get(`/api/patients/${patient.id}/pairs`).query({ view: 'frontal-rest' })).status).toBe(403);
  });
});

const compare = (a: string, b: string) => prac.get(`/api/patients/${patient.id}/compare`).query({ baseline: a, followUp: b });

describe('compare a pair', () => {
  it('gives both measurements and the change, with the patient target and the caution', async () => {
    const res = await compare(base.photoId, follow.photoId);
    expect(res.status).toBe(200);
    expect(res.body.view).toEqual({ key: 'frontal-rest', label: 'Frontal, at rest', measured: true });
    expect(res.body.comparable).toBe(true);
    expect(res.body.reasons).toEqual([]);
    // Hand computation: baseline upper 20 px, lower 40 px → 1:2; follow-up upper 30 px → 40/30 = 1:1.333.
    expect(res.body.baseline.measurements.ratio).toBeCloseTo(2, 9);
    expect(res.body.followUp.measurements.ratio).toBeCloseTo(4 / 3, 9);
    expect(res.body.change.ratio.delta).toBeCloseTo(4 / 3 - 2, 9);
    // Upper height 0.10 → 0.15 IPD: +50 %.
    expect(res.body.change.upperHeight.pct).toBeCloseTo(50, 9);
    expect(res.body.target).toMatchObject({ value: 1.6, key: '1:1.6' });
    expect(res.body.caution).toMatch(/guides/);
    expect(res.body.baseline).toMatchObject({ photoId: base.photoId, visitId: base.visitId, alignmentState: 'aligned', landmarksSource: 'auto' });
    const events = await t.db.getRepository(AuditEvent).findBy({ action: 'compare.view', patientId: patient.id });
    expect(events.length).toBeGreaterThan(0);
  });

  it('maps the landmarks into the aligned frame for the overlay', async () => {
    const res = await compare(base.photoId, follow.photoId);
    const o = res.body.baseline.overlay;
    // Display point 51 = (400, 680); frame = 1.5·(400, 680) + (0, 20) = (600, 1040).
    expect(o.display.points[51]).toEqual([400, 680]);
    expect(o.aligned.points[51][0]).toBeCloseTo(600, 9);
    expect(o.aligned.points[51][1]).toBeCloseTo(1040, 9);
    expect(o.aligned).toMatchObject({ width: 1200, height: 1500 });
  });

  it('says plainly when the head is turned differently from the baseline', async () => {
    const res = await compare(base.photoId, turned.photoId);
    expect(res.status).toBe(200);
    expect(res.body.comparable).toBe(false);
    expect(res.body.pairWarnings.map((w: { code: string }) => w.code)).toContain('yaw-baseline');
    expect(res.body.reasons.join(' ')).toMatch(/turned/);
    // The turned photo also does not fit a frontal view on its own (|yaw| > 10°).
    expect(res.body.followUp.warnings.map((w: { code: string }) => w.code)).toContain('yaw-view');
  });

  it('says when a photo is not aligned, so the pair is shown as taken', async () => {
    const res = await compare(base.photoId, unaligned.photoId);
    expect(res.body.comparable).toBe(false);
    expect(res.body.followUp.alignmentState).toBe('needs-landmarks');
    expect(res.body.reasons.join(' ')).toMatch(/could not be aligned/);
  });

  it('never mixes views or patients, and refuses the same photo twice', async () => {
    const mixed = await compare(base.photoId, lips.photoId);
    expect(mixed.status).toBe(400);
    expect(mixed.body.error.code).toBe('VIEW_MISMATCH');
    const stranger = await createPatient(t.db);
    const theirs = await photoAt(stranger.id, 3, 'frontal-rest', 9);
    const foreign = await compare(base.photoId, theirs.photoId);
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.code).toBe('PHOTO_OF_ANOTHER_PATIENT');
    expect((await compare(base.photoId, base.photoId)).body.error.code).toBe('SAME_PHOTO');
    const bad = await prac.get(`/api/patients/${patient.id}/compare`).query({ baseline: 'x' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('VALIDATION_FAILED');
  });

  it('is closed to the front desk', async () => {
    const desk = (await signedIn(t, 'coordinator')).client;
    expect((await desk.get(`/api/patients/${patient.id}/compare`).query({ baseline: base.photoId, followUp: follow.photoId })).status).toBe(403);
    expect((await desk.post(`/api/patients/${patient.id}/comparison-sheet`).send({ view: 'frontal-rest', layout: 'pair', photoIds: [base.photoId, follow.photoId] })).status).toBe(403);
  });
});

async function pdfText(pdf: Buffer): Promise<string> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tf-sheet-'));
  try {
    fs.writeFileSync(path.join(dir, 'sheet.pdf'), pdf);
    // pdftotext (poppler-utils), an outside reader: what it extracts is what a patient's PDF viewer shows.
    const { stdout } = await run('pdftotext', ['-layout', path.join(dir, 'sheet.pdf'), '-']);
    return stdout;
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

const binary = (res: import('superagent').Response, cb: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => cb(null, Buffer.concat(chunks)));
};

describe('comparison sheet', () => {
  it('downloads a PDF of the pair with dates, view, measurements, target and the cautions, and logs it', async () => {
    const res = await prac
      .post(`/api/patients/${patient.id}/comparison-sheet`)
      .send({ view: 'frontal-rest', layout: 'pair', photoIds: [base.photoId, follow.photoId] })
      .buffer(true)
      .parse(binary);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    expect(res.headers['content-disposition']).toMatch(/attachment; filename="comparison-frontal-rest-\d{4}-\d{2}-\d{2}\.pdf"/);
    const text = await pdfText(res.body as Buffer);
    expect(text).toContain('Comparison sheet');
    expect(text).toContain('Zoë Łukasiewicz-Řezníčková');
    expect(text).toContain('Frontal, at rest');
    const dateOf = (iso: string) => new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', day: 'numeric', month: 'long', year: 'numeric' }).format(new Date(iso));
    expect(text).toContain(dateOf(daysAgo(60)));
    expect(text).toContain(dateOf(daysAgo(20)));
    expect(text).toContain('1:2.0');
    expect(text).toContain('1:1.3');
    expect(text).toMatch(/target[^\n]*1:1\.6/);
    expect(text).toMatch(/Results vary/);
    expect(text).toMatch(/guides for discussion, not treatment targets/);
    // Signed by the clinic like a consent: a CMS signature (RFC 5652) over the byte range, checked by poppler's pdfsig.
    const report = pdfTool(res.body as Buffer, 'pdfsig');
    expect(report).toContain('Signature Validation: Signature is Valid.');
    expect(report).toContain('Signer Certificate Common Name: Linden Row Aesthetics');
    expect(signatureDictionaries(res.body as Buffer)[0]['/Reason']).toBe('u:Comparison sheet of Zoë Łukasiewicz-Řezníčková, Frontal, at rest');
    expect(pdfTool(res.body as Buffer, 'qpdf')).toMatch(/No syntax or stream encoding errors found/);
    const logged = await t.db.getRepository(AuditEvent).findBy({ action: 'comparison-sheet.download', patientId: patient.id });
    expect(logged).toHaveLength(1);
    expect(JSON.parse(logged[0].details)).toMatchObject({ view: 'frontal-rest', layout: 'pair', photos: [base.photoId, follow.photoId] });
  });

  it('prints a strip oldest first and warns on the sheet about photos that are not comparable', async () => {
    const res = await prac
      .post(`/api/patients/${patient.id}/comparison-sheet`)
      .send({ view: 'frontal-rest', layout: 'strip', photoIds: [unaligned.photoId, follow.photoId, base.photoId] })
      .buffer(true)
      .parse(binary);
    expect(res.status).toBe(200);
    const text = await pdfText(res.body as Buffer);
    expect(text).toMatch(/3 visits/);
    expect(text).toMatch(/not directly comparable/);
    expect(text).toMatch(/not aligned/);
  });

  it('refuses a pair that is not two photos, or photos of two views, storing and logging nothing', async () => {
    const before = await t.db.getRepository(AuditEvent).countBy({ patientId: patient.id, action: 'comparison-sheet.download' });
    const three = await prac.post(`/api/patients/${patient.id}/comparison-sheet`).send({ view: 'frontal-rest', layout: 'pair', photoIds: [base.photoId, follow.photoId, turned.photoId] });
    expect(three.status).toBe(400);
    const mixed = await prac.post(`/api/patients/${patient.id}/comparison-sheet`).send({ view: 'frontal-rest', layout: 'pair', photoIds: [base.photoId, lips.photoId] });
    expect(mixed.status).toBe(400);
    expect(mixed.body.error.code).toBe('VIEW_MISMATCH');
    expect(await t.db.getRepository(AuditEvent).countBy({ patientId: patient.id, action: 'comparison-sheet.download' })).toBe(before);
  });

  it("e-mails the sheet to the patient through the outbox, with the PDF attached", async () => {
    const res = await prac.post(`/api/patients/${patient.id}/comparison-sheet/email`).send({ view: 'frontal-rest', layout: 'pair', photoIds: [base.photoId, follow.photoId] });
    expect(res.status).toBe(202);
    expect(res.body).toMatchObject({ queued: true, to: 'zoe@mail.example' });
    const row = await t.db.getRepository(MailLog).findOneByOrFail({ id: res.body.mailId });
    expect(row).toMatchObject({ relatedType: 'comparison-sheet', patientId: patient.id });
    await t.deps.mailer.runOnce();
    await t.deps.mailer.idle();
    const mails = await t.mails();
    const mail = mails.find((m) => m.subject?.startsWith('Your comparison sheet'));
    expect(mail).toBeDefined();
    expect(mail!.text).toMatch(/guides for discussion, not treatment targets/);
    const pdf = mail!.attachments.find((a) => a.contentType === 'application/pdf');
    expect(pdf).toBeDefined();
    expect(await pdfText(pdf!.content)).toContain('Zoë Łukasiewicz-Řezníčková');
    expect(pdfTool(pdf!.content, 'pdfsig')).toContain('Signature Validation: Signature is Valid.');
    expect(await t.db.getRepository(AuditEvent).countBy({ action: 'comparison-sheet.email', patientId: patient.id })).toBe(1);
  });

  it('refuses to e-mail a patient with no address, leaving no stored sheet behind', async () => {
    const nobody = await createPatient(t.db, { email: null });
    const a = await photoAt(nobody.id, 30, 'frontal-rest', 11);
    const b = await photoAt(nobody.id, 2, 'frontal-rest', 12);
    const res = await prac.post(`/api/patients/${nobody.id}/comparison-sheet/email`).send({ view: 'frontal-rest', layout: 'pair', photoIds: [a.photoId, b.photoId] });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('NO_EMAIL');
    expect(await t.deps.storage.list(`patients/${nobody.id}/sheets/`)).toEqual([]);
  });
});
