import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { patientWithVisit, photoLikeJpeg, upload } from '../helpers/photos.js';

let t: TestApp;
let admin: Client;
let practitioner: Client;
let practitionerId: string;

beforeAll(async () => {
  t = await makeTestApp();
  admin = (await signedIn(t, 'admin')).client;
  const p = await signedIn(t, 'practitioner');
  practitioner = p.client;
  practitionerId = p.user.id;
});
afterAll(() => t.close());

const events = (where: { action: string; targetId?: string; actorRole?: string }) => t.db.getRepository(AuditEvent).countBy(where);

describe('access log', () => {
  it('records exactly one event per view of a clinical photo, for each role that may see it', async () => {
    const { visit } = await patientWithVisit(t, practitioner, practitionerId);
    const up = await upload(practitioner, visit.id, await photoLikeJpeg(800, 1000, 3), { view: 'frontal-rest' });
    expect(up.status).toBe(201);
    const photoId = up.body.id as string;
    const coordinator = (await signedIn(t, 'coordinator')).client;
    for (const [client, role] of [
      [admin, 'admin'],
      [practitioner, 'practitioner'],
    ] as const) {
      const before = await events({ action: 'photo.view', targetId: photoId, actorRole: role });
      const res = await client.get(`/api/photos/${photoId}/file?variant=display`);
      expect(res.status).toBe(200);
      expect(await events({ action: 'photo.view', targetId: photoId, actorRole: role })).toBe(before + 1);
    }
    // The front desk sees no clinical photos (DESIGN §2), and a refused attempt shows nothing.
    expect((await coordinator.get(`/api/photos/${photoId}/file?variant=display`)).status).toBe(403);
    expect(await events({ action: 'photo.view', targetId: photoId, actorRole: 'coordinator' })).toBe(0);
  });

  it('filters by user, patient, action and day, and pages on the server', async () => {
    const a = await createPatient(t.db, { firstName: 'Philippa', lastName: 'Loggins' });
    for (let i = 0; i < 3; i++) await practitioner.get(`/api/patients/${a.id}`);
    const byPatient = await admin.get('/api/access-log').query({ patientId: a.id, action: 'patient.view', pageSize: 2 });
    expect(byPatient.status).toBe(200);
    expect(byPatient.body.total).toBe(3);
    expect(byPatient.body.items).toHaveLength(2);
    expect(byPatient.body.items[0]).toMatchObject({ action: 'patient.view', patientName: 'Philippa Loggins', actorName: 'Test practitioner' });
    expect(byPatient.body).toMatchObject({ totalIsAtLeast: false, newer: null });
    const page2 = await admin.get('/api/access-log').query({ patientId: a.id, action: 'patient.view', pageSize: 2, before: byPatient.body.older });
    expect(page2.body.items).toHaveLength(1);
    expect(page2.body.older).toBeNull();
    const ids = new Set([...byPatient.body.items, ...page2.body.items].map((i: { id: string }) => i.id));
    expect(ids.size).toBe(3);
    // Back up from the second page gives the first page again, in the same order.
    const back = await admin.get('/api/access-log').query({ patientId: a.id, action: 'patient.view', pageSize: 2, after: page2.body.newer });
    expect(back.body.items.map((i: { id: string }) => i.id)).toEqual(byPatient.body.items.map((i: { id: string }) => i.id));
    expect(back.body.newer).toBeNull();

    const yesterday = new Date(Date.now() - 2 * 86_400_000).toISOString().slice(0, 10);
    expect((await admin.get('/api/access-log').query({ patientId: a.id, to: yesterday })).body.total).toBe(0);
    expect((await admin.get('/api/access-log').query({ patientId: a.id, from: yesterday })).body.total).toBe(3);

    const me = await admin.get('/api/auth/me');
    const byUser = await admin.get('/api/access-log').query({ userId: me.body.id, action: 'auth.login' });
    expect(byUser.body.total).toBe(1);
  });

  it('logs a self-refreshing timeline once a minute per person, not on every refresh', async () => {
    const p = await createPatient(t.db);
    for (let i = 0; i < 3; i++) expect((await practitioner.get(`/api/patients/${p.id}/timeline`)).status).toBe(200);
    await admin.get(`/api/patients/${p.id}/timeline`);
    expect(await events({ action: 'timeline.view', targetId: p.id, actorRole: 'practitioner' })).toBe(1);
    expect(await events({ action: 'timeline.view', targetId: p.id, actorRole: 'admin' })).toBe(1);
  });

  it('refuses bad filters clearly', async () => {
    expect((await admin.get('/api/access-log').query({ from: '2026-05-02', to: '2026-05-01' })).status).toBe(400);
    expect((await admin.get('/api/access-log').query({ userId: 'nope' })).status).toBe(400);
    expect((await admin.get('/api/access-log').query({ action: "x' OR 1=1" })).status).toBe(400);
    expect((await admin.get('/api/access-log').query({ before: '2026-01-01' })).status).toBe(400);
    expect((await admin.get('/api/access-log').query({ page: 2 })).status).toBe(400);
  });

  it('exports CSV (RFC 4180 quoting, formula-safe) and logs the export itself', async () => {
    const p = await createPatient(t.db, { firstName: '=HYPERLINK("x")', lastName: 'Comma, "Quoted"' });
    await practitioner.get(`/api/patients/${p.id}`);
    const res = await admin.get('/api/access-log.csv').query({ patientId: p.id });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toContain('text/csv');
    const lines = res.text.trim().split('\r\n');
    expect(lines[0]).toBe('at,actorName,actorRole,action,patientCode,patientName,targetType,targetId,ip,userAgent,details');
    expect(lines).toHaveLength(2);
    // RFC 4180: fields with commas or quotes are quoted, quotes doubled; a leading "=" is neutralised.
    expect(lines[1]).toContain(`"'=HYPERLINK(""x"") Comma, ""Quoted"""`);
    expect(await events({ action: 'access_log.export' })).toBe(1);
  });

  it('is for admins only', async () => {
    expect((await practitioner.get('/api/access-log')).status).toBe(403);
  });
});
