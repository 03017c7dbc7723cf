import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { Patient } from '../../server/entities/patient.js';
import { Visit } from '../../server/entities/visit.js';
import { Client, createPatient, makeTestApp, signedIn, type TestApp } from '../helpers/app.js';

let t: TestApp;
let coordinator: Client;
let practitioner: Client;
let practitionerId: string;

beforeAll(async () => {
  t = await makeTestApp({ TWINFRAME_IDLE_MINUTES: '15' });
  coordinator = (await signedIn(t, 'coordinator')).client;
  const p = await signedIn(t, 'practitioner');
  practitioner = p.client;
  practitionerId = p.user.id;
});
afterAll(() => t.close());

const valid = { firstName: 'Rosalind', lastName: 'Quennell', dateOfBirth: '1990-06-15', email: 'rosalind@mail.example', phone: '+44 7700 900555' };
const countPatients = () => t.db.getRepository(Patient).count();

describe('patients', () => {
  it('creates a patient with a clinic code, logs it, and finds it by name, code and date of birth', async () => {
    const res = await coordinator.post('/api/patients').send(valid);
    expect(res.status).toBe(201);
    expect(res.body.code).toMatch(/^LR-\d{4}$/);
    const events = await t.db.getRepository(AuditEvent).findBy({ action: 'patient.create', patientId: res.body.id });
    expect(events).toHaveLength(1);
    for (const q of ['quenn', 'Rosalind Quennell', res.body.code, '1990-06-15', '15/06/1990']) {
      const found = await coordinator.get('/api/patients').query({ q });
      expect(found.body.items.map((p: { id: string }) => p.id), q).toContain(res.body.id);
    }
    const none = await coordinator.get('/api/patients').query({ q: '%' });
    expect(none.body.items).toHaveLength(0);
  });

  it('pages on the server', async () => {
    for (let i = 0; i < 5; i++) await createPatient(t.db, { lastName: `Pager${i}` });
    const page1 = await coordinator.get('/api/patients').query({ q: 'Pager', pageSize: 2, page: 1 });
    const page3 = await coordinator.get('/api/patients').query({ q: 'Pager', pageSize: 2, page: 3 });
    expect(page1.body.total).toBe(5);
    expect(page1.body.items).toHaveLength(2);
    expect(page3.body.items).toHaveLength(1);
  });

  it('logs each view and each edit with the fields changed', async () => {
    const p = await createPatient(t.db);
    expect((await practitioner.get(`/api/patients/${p.id}`)).status).toBe(200);
    const edit = await practitioner.patch(`/api/patients/${p.id}`).send({ phone: '+44 1632 960000' });
    expect(edit.status).toBe(200);
    expect(edit.body.phone).toBe('+44 1632 960000');
    const events = await t.db.getRepository(AuditEvent).find({ where: { patientId: p.id }, order: { at: 'ASC' } });
    expect(events.map((e) => e.action)).toEqual(['patient.view', 'patient.edit']);
    expect(JSON.parse(events[1].details)).toEqual({ fields: ['phone'] });
  });

  describe('refuses bad input with a clear 4xx and stores nothing', () => {
    const cases: [string, unknown, string][] = [
      ['a date of birth in the future', { ...valid, dateOfBirth: '2999-01-01' }, 'cannot be in the future'],
      ['an impossible date', { ...valid, dateOfBirth: '1990-02-31' }, 'Not a real date'],
      ['an unknown field', { ...valid, isVip: true }, 'isVip'],
      ['an over-long name', { ...valid, lastName: 'x'.repeat(81) }, 'at most 80'],
      ['a missing first name', { ...valid, firstName: '  ' }, 'first name'],
      ['a bad e-mail', { ...valid, email: 'not-an-email' }, 'valid e-mail'],
    ];
    for (const [what, body, message] of cases) {
      it(what, async () => {
        const before = await countPatients();
        const res = await coordinator.post('/api/patients').send(body as object);
        expect(res.status).toBe(400);
        expect(res.body.error.code).toBe('VALIDATION_FAILED');
        expect(JSON.stringify(res.body.error)).toContain(message);
        expect(await countPatients()).toBe(before);
      });
    }

    it('malformed JSON', async () => {
      const before = await countPatients();
      const res = await coordinator.post('/api/patients').set('Content-Type', 'application/json').send('{"firstName": ');
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('MALFORMED_JSON');
      expect(await countPatients()).toBe(before);
    });

    it('a body over the size limit', async () => {
      const res = await coordinator.post('/api/patients').send({ ...valid, firstName: 'x'.repeat(300_000) });
      expect(res.status).toBe(413);
      expect(res.body.error.code).toBe('TOO_LARGE');
    });

    it('a missing patient', async () => {
      const res = await coordinator.get('/api/patients/00000000-0000-4000-8000-000000000000');
      expect(res.status).toBe(404);
      expect(res.body.error.message).toBe('Patient not found.');
    });

    it('an id that is not a uuid', async () => {
      const res = await coordinator.get('/api/patients/..%2F..%2Fetc');
      expect(res.status).toBe(400);
    });
  });

  it('answers an ended session with SESSION_ENDED', async () => {
    const stale = await request(t.app).get('/api/patients').set('Cookie', 'tf.sid=s%3Anot-a-session.sig');
    expect(stale.status).toBe(401);
    expect(stale.body.error.code).toBe('SESSION_ENDED');
  });
});

describe('visits and clinic day', () => {
  it('books a visit, hides clinical notes from coordinators, and shows it on the clinic day', async () => {
    const p = await createPatient(t.db);
    const startsAt = new Date().toISOString();
    const created = await practitioner.post(`/api/patients/${p.id}/visits`).send({ startsAt, kind: 'treatment', practitionerId, notes: 'Left upper lip slightly fuller at baseline.' });
    expect(created.status).toBe(201);
    expect(created.body.practitionerName).toBe('Test practitioner');
    const asCoordinator = await coordinator.get(`/api/visits/${created.body.id}`);
    expect(asCoordinator.body.notes).toBeUndefined();
    const asPractitioner = await practitioner.get(`/api/visits/${created.body.id}`);
    expect(asPractitioner.body.notes).toContain('fuller');
    const day = await coordinator.get('/api/clinic-day');
    const ids = day.body.practitioners.flatMap((g: { visits: { id: string }[] }) => g.visits.map((v) => v.id));
    expect(ids).toContain(created.body.id);
  });

  it('refuses a coordinator as the practitioner, a bad time, and notes from the front desk', async () => {
    const p = await createPatient(t.db);
    const before = await t.db.getRepository(Visit).count();
    const { user: desk } = await signedIn(t, 'coordinator');
    const notPractitioner = await coordinator.post(`/api/patients/${p.id}/visits`).send({ startsAt: new Date().toISOString(), kind: 'review', practitionerId: desk.id });
    expect(notPractitioner.status).toBe(400);
    const badTime = await coordinator.post(`/api/patients/${p.id}/visits`).send({ startsAt: 'tomorrow', kind: 'review', practitionerId });
    expect(badTime.status).toBe(400);
    const notes = await coordinator.post(`/api/patients/${p.id}/visits`).send({ startsAt: new Date().toISOString(), kind: 'review', practitionerId, notes: 'x' });
    expect(notes.status).toBe(403);
    expect(await t.db.getRepository(Visit).count()).toBe(before);
  });
});

describe('users', () => {
  it('refuses an e-mail already taken and a short password', async () => {
    const { client: admin, user } = await signedIn(t, 'admin');
    const taken = await admin.post('/api/users').send({ email: user.email, name: 'Copy', role: 'coordinator', password: 'long-enough-password' });
    expect(taken.status).toBe(409);
    expect(taken.body.error.code).toBe('EMAIL_TAKEN');
    const short = await admin.post('/api/users').send({ email: 'new@clinic.example', name: 'New', role: 'coordinator', password: 'short' });
    expect(short.status).toBe(400);
    const self = await admin.patch(`/api/users/${user.id}`).send({ active: false });
    expect(self.status).toBe(400);
  });

  it('creates, changes role, resets password and deactivates', async () => {
    const { client: admin } = await signedIn(t, 'admin');
    const created = await admin.post('/api/users').send({ email: 'Nell@Clinic.example', name: 'Nell Ashby', role: 'coordinator', password: 'first-password-123' });
    expect(created.status).toBe(201);
    expect(created.body.email).toBe('nell@clinic.example');
    expect(created.body.passwordHash).toBeUndefined();
    const promoted = await admin.patch(`/api/users/${created.body.id}`).send({ role: 'practitioner' });
    expect(promoted.body.role).toBe('practitioner');
    expect((await admin.post(`/api/users/${created.body.id}/password`).send({ password: 'second-password-456' })).status).toBe(204);
    const nell = new Client(t.app);
    expect((await nell.login('nell@clinic.example', 'first-password-123')).status).toBe(401);
    expect((await nell.login('nell@clinic.example', 'second-password-456')).status).toBe(200);
    await admin.patch(`/api/users/${created.body.id}`).send({ active: false });
    expect((await nell.get('/api/auth/me')).status).toBe(401);
  });
});
