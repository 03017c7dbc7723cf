import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ConsentTemplate } from '../../server/entities/consent-template.js';
import { canonicalJson, sha256Hex } from '../../server/features/consents/hash.js';
import { DEMO_TEMPLATES, insertDemoTemplates } from '../../server/features/consents/demo-templates.js';
import { createTemplateSchema } from '../../server/features/consents/templates.schemas.js';
import { templateSha256 } from '../../server/features/consents/templates.service.js';
import { createUser, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';

let t: TestApp;
let admin: Client;
beforeAll(async () => {
  t = await makeTestApp();
  admin = (await signedIn(t, 'admin')).client;
});
afterAll(() => t.close());

const draft = {
  kind: 'photography',
  title: 'Photo consent (test)',
  body: '# Photos\n\nWe take photos. <script>alert(1)</script>',
  questions: [{ id: 'teaching', type: 'yes-no', label: 'Teaching use?', required: true }],
};

describe('the archive hash', () => {
  it('matches the FIPS 180-4 SHA-256 test vectors', () => {
    // FIPS 180-4 / NIST CSRC example values (FACTS 15): "abc" and the empty message.
    expect(sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(sha256Hex('')).toBe('e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855');
    expect(sha256Hex(Buffer.from('abc'))).toBe(sha256Hex('abc'));
  });

  it('serialises content canonically whatever the key order', () => {
    expect(canonicalJson({ b: 1, a: { d: [2, { y: 1, x: 'é' }], c: null } })).toBe('{"a":{"c":null,"d":[2,{"x":"é","y":1}]},"b":1}');
    expect(canonicalJson({ a: 1, b: 2 })).toBe(canonicalJson({ b: 2, a: 1 }));
  });
});

describe('consent templates', () => {
  it('creates a draft, edits it, publishes it with the SHA-256 of its content', async () => {
    const created = await admin.post('/api/consent-templates').send(draft);
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ status: 'draft', version: 1, sha256: null });
    const edited = await admin.patch(`/api/consent-templates/${created.body.id}`).send({ title: 'Clinical photography (test)' });
    expect(edited.status).toBe(200);
    const published = await admin.post(`/api/consent-templates/${created.body.id}/publish`).send({});
    expect(published.status).toBe(200);
    expect(published.body.status).toBe('published');
    const row = await t.db.getRepository(ConsentTemplate).findOneByOrFail({ id: created.body.id });
    expect(published.body.sha256).toBe(templateSha256(row));
    expect(published.body.sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it('refuses to change a published version, through the API and in the database itself', async () => {
    const { body: t1 } = await admin.post('/api/consent-templates').send(draft);
    await admin.post(`/api/consent-templates/${t1.id}/publish`).send({});
    const patch = await admin.patch(`/api/consent-templates/${t1.id}`).send({ body: 'Changed.' });
    expect(patch.status).toBe(409);
    expect(patch.body.error.code).toBe('TEMPLATE_NOT_DRAFT');
    await expect(t.db.query(`UPDATE consent_template SET body = 'sneaky' WHERE id = ?`, [t1.id])).rejects.toThrow(/immutable/);
    await expect(t.db.query(`UPDATE consent_template SET status = 'draft' WHERE id = ?`, [t1.id])).rejects.toThrow(/immutable/);
    await expect(t.db.query(`DELETE FROM consent_template WHERE id = ?`, [t1.id])).rejects.toThrow(/cannot be deleted/);
    expect((await admin.delete(`/api/consent-templates/${t1.id}`)).status).toBe(409);
    const row = await t.db.getRepository(ConsentTemplate).findOneByOrFail({ id: t1.id });
    expect(row.body).toBe(draft.body);
    expect(templateSha256(row)).toBe(row.sha256);
  });

  it('makes an edit a new version; publishing it retires the old one, which stays readable and cannot come back', async () => {
    const { body: v1 } = await admin.post('/api/consent-templates').send({ ...draft, title: 'Versioned form' });
    await admin.post(`/api/consent-templates/${v1.id}/publish`).send({});
    const v2 = await admin.post(`/api/consent-templates/${v1.id}/versions`).send({});
    expect(v2.status).toBe(201);
    expect(v2.body).toMatchObject({ familyId: v1.familyId, version: 2, status: 'draft', title: 'Versioned form' });
    const second = await admin.post(`/api/consent-templates/${v1.id}/versions`).send({});
    expect(second.status).toBe(409);
    expect(second.body.error).toMatchObject({ code: 'DRAFT_EXISTS', details: { draftId: v2.body.id } });
    await admin.patch(`/api/consent-templates/${v2.body.id}`).send({ body: 'Second wording.' });
    const pub2 = await admin.post(`/api/consent-templates/${v2.body.id}/publish`).send({});
    expect(pub2.body.sha256).not.toBe((await admin.get(`/api/consent-templates/${v1.id}`)).body.sha256);
    const old = await admin.get(`/api/consent-templates/${v1.id}`);
    expect(old.status).toBe(200);
    expect(old.body).toMatchObject({ status: 'retired', body: draft.body });
    expect(old.body.retiredAt).not.toBeNull();
    await expect(t.db.query(`UPDATE consent_template SET status = 'published' WHERE id = ?`, [v1.id])).rejects.toThrow(/immutable/);
    const again = await admin.post(`/api/consent-templates/${v1.id}/retire`).send({});
    expect(again.status).toBe(409);
    const retired = await admin.post(`/api/consent-templates/${v2.body.id}/retire`).send({});
    expect(retired.body.status).toBe('retired');
  });

  it('deletes a draft but nothing published', async () => {
    const { body } = await admin.post('/api/consent-templates').send(draft);
    expect((await admin.delete(`/api/consent-templates/${body.id}`)).status).toBe(204);
    expect(await t.db.getRepository(ConsentTemplate).existsBy({ id: body.id })).toBe(false);
  });

  it('answers bad templates with clear errors and stores nothing', async () => {
    const before = await t.db.getRepository(ConsentTemplate).count();
    const cases: [object, RegExp][] = [
      [{ ...draft, kind: 'showcase' }, /at least one channel/],
      [{ ...draft, channels: ['print'] }, /Only a showcase consent has channels/],
      [{ ...draft, questions: [{ id: 'a', type: 'yes-no', label: 'A?' }, { id: 'a', type: 'text', label: 'B' }] }, /used twice/],
      [{ ...draft, questions: [{ id: 'a', type: 'yes-no', label: 'A?', flagWhen: ['maybe'] }] }, /not a possible answer/],
      [{ ...draft, questions: [{ id: 'a', type: 'choice', label: 'A?' }] }, /needs options/],
      [{ ...draft, title: '' }, /Enter a title/],
    ];
    for (const [body, message] of cases) {
      const res = await admin.post('/api/consent-templates').send(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.code).toBe('VALIDATION_FAILED');
      expect(JSON.stringify(res.body.error)).toMatch(message);
    }
    expect(await t.db.getRepository(ConsentTemplate).count()).toBe(before);
  });

  it('lets only admins write templates; all staff read them', async () => {
    const { client: coordinator } = await signedIn(t, 'coordinator');
    expect((await coordinator.post('/api/consent-templates').send(draft)).status).toBe(403);
    const list = await coordinator.get('/api/consent-templates?status=published');
    expect(list.status).toBe(200);
    expect(list.body.every((x: { status: string }) => x.status === 'published')).toBe(true);
  });
});

describe('demo templates', () => {
  it('are valid forms of all four kinds and publish with matching hashes', async () => {
    for (const d of DEMO_TEMPLATES) expect(() => createTemplateSchema.parse(d)).not.toThrow();
    expect(DEMO_TEMPLATES.map((d) => d.kind).sort()).toEqual(['photography', 'screening', 'showcase', 'treatment']);
    const adminUser = await createUser(t.db, 'admin');
    const rows = await insertDemoTemplates(t.db, adminUser.id, new Date().toISOString());
    for (const r of rows) expect(templateSha256(await t.db.getRepository(ConsentTemplate).findOneByOrFail({ id: r.id }))).toBe(r.sha256);
  });

  it('cover the risks and rights the forms must state', () => {
    const text = (kind: string) => DEMO_TEMPLATES.find((d) => d.kind === kind)!;
    const treatment = text('treatment').body.toLowerCase();
    for (const risk of ['swelling', 'bruising', 'tenderness', 'asymmetry', 'lumps', 'infection', 'cold-sore', 'vascular occlusion', 'loss of skin and tissue', 'loss of vision', 'aftercare']) {
      expect(treatment, risk).toContain(risk);
    }
    // GDPR Art. 7(3): withdrawal at any time; 45 CFR 164.508(a)(3)/(c): what, who, purpose, expiry, right to revoke.
    const showcase = text('showcase').body.toLowerCase();
    for (const part of ['what', 'who will use them', 'why', 'three years after the date you sign', 'at any time']) expect(showcase, part).toContain(part);
    expect(text('showcase').channels).toEqual(['clinic-website', 'social-media', 'print', 'professional-education']);
    // Tiered photography consent (common practice): clinical record / teaching / publication.
    expect(text('photography').questions.map((q) => q.id)).toEqual(['clinical-record', 'teaching', 'publication']);
    expect(text('photography').body.toLowerCase()).toContain('withdraw');
    // FACTS 18: each contraindication and caution is asked, and flagged for review.
    const flagged = text('screening').questions.filter((q) => q.flagWhen?.length).map((q) => q.id);
    for (const id of ['under-18', 'pregnant-breastfeeding', 'infection-at-site', 'allergy-filler-anaesthetic', 'blood-thinners', 'autoimmune-immunosuppression', 'dental-work', 'vaccination', 'permanent-filler']) {
      expect(flagged).toContain(id);
    }
  });
});
