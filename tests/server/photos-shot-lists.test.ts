import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEFAULT_SHOT_LIST_ID } from '../../server/entities/shot-list.js';
import { makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { patientWithVisit, photoLikeJpeg, upload } from '../helpers/photos.js';

let t: TestApp;
let admin: Client;
let practitioner: Client;
let practitionerId: string;
let coordinator: Client;
beforeAll(async () => {
  t = await makeTestApp();
  admin = (await signedIn(t, 'admin')).client;
  const p = await signedIn(t, 'practitioner');
  practitioner = p.client;
  practitionerId = p.user.id;
  coordinator = (await signedIn(t, 'coordinator')).client;
});
afterAll(() => t.close());

type ShotList = { id: string; name: string; isDefault: boolean; archived: boolean; views: { key: string; label: string; hint: string; anchorKind: string; position: number }[] };

describe('shot lists', () => {
  it('ships the default "Lips & lower face" list with the eight standard views, each with a hint', async () => {
    const res = await practitioner.get('/api/shot-lists');
    expect(res.status).toBe(200);
    const def = (res.body as ShotList[])[0];
    expect(def).toMatchObject({ id: DEFAULT_SHOT_LIST_ID, name: 'Lips & lower face', isDefault: true });
    // Standard views of facial photography: frontal (rest, smiling), oblique 45° and lateral 90° both sides, and a
    // close-up of the lips (common practice; e.g. Ettorre et al., J Craniomaxillofac Surg 34:65–73, 2006).
    expect(def.views.map((v) => v.key)).toEqual([
      'frontal-rest', 'frontal-smile', 'lips-rest', 'lips-pucker', 'oblique-left', 'oblique-right', 'lateral-left', 'lateral-right',
    ]);
    expect(def.views.map((v) => v.position)).toEqual([0, 1, 2, 3, 4, 5, 6, 7]);
    for (const v of def.views) expect(v.hint.length, v.key).toBeGreaterThan(60);
    expect(Object.fromEntries(def.views.map((v) => [v.key, v.anchorKind]))).toMatchObject({ 'frontal-rest': 'face', 'lips-rest': 'lips', 'lateral-left': 'profile' });
    expect((await coordinator.get('/api/shot-lists')).status).toBe(403);
  });

  it('gives new visits the default list', async () => {
    const { visit } = await patientWithVisit(t, practitioner, practitionerId);
    expect(visit.shotListId).toBe(DEFAULT_SHOT_LIST_ID);
  });

  it('lets an admin create, reorder and rename views; refuses dropping a view that has photos', async () => {
    const created = await admin.post('/api/shot-lists').send({
      name: 'Lips only',
      views: [
        { key: 'lips-rest', label: 'Lips at rest', hint: 'Close-up, lips relaxed.', anchorKind: 'lips' },
        { key: 'lips-pucker', label: 'Pucker', anchorKind: 'lips' },
        { key: 'chin-profile', label: 'Chin profile', hint: 'Left profile, chin to nose.', anchorKind: 'profile' },
      ],
    });
    expect(created.status).toBe(201);
    const list = created.body as ShotList;
    expect(list.views.map((v) => v.key)).toEqual(['lips-rest', 'lips-pucker', 'chin-profile']);
    expect((await practitioner.post('/api/shot-lists').send({ name: 'x', views: list.views })).status).toBe(403);

    const { visit } = await patientWithVisit(t, practitioner, practitionerId);
    const chosen = await practitioner.put(`/api/visits/${visit.id}/shot-list`).send({ shotListId: list.id });
    expect(chosen.status).toBe(200);
    // A view of the default list is not part of this visit's list any more.
    const wrong = await upload(practitioner, visit.id, await photoLikeJpeg(200, 200, 1), { view: 'frontal-rest' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.details.views).toEqual(['lips-rest', 'lips-pucker', 'chin-profile']);
    expect((await upload(practitioner, visit.id, await photoLikeJpeg(200, 200, 2), { view: 'chin-profile' })).status).toBe(201);

    const reordered = await admin.patch(`/api/shot-lists/${list.id}`).send({
      name: 'Lips and chin',
      views: [
        { key: 'chin-profile', label: 'Chin, left profile', hint: 'Left profile.', anchorKind: 'profile' },
        { key: 'lips-rest', label: 'Lips at rest', anchorKind: 'lips' },
      ],
    });
    expect(reordered.status).toBe(200);
    expect(reordered.body.name).toBe('Lips and chin');
    expect(reordered.body.views.map((v: { key: string; position: number }) => [v.key, v.position])).toEqual([['chin-profile', 0], ['lips-rest', 1]]);

    const dropUsed = await admin.patch(`/api/shot-lists/${list.id}`).send({ views: [{ key: 'lips-rest', label: 'Lips at rest', anchorKind: 'lips' }] });
    expect(dropUsed.status).toBe(409);
    expect(dropUsed.body.error.details.views).toEqual(['chin-profile']);
    expect((await admin.get(`/api/shot-lists/${list.id}`)).body.views).toHaveLength(2);
  });

  it('validates views and keeps the default list from being archived', async () => {
    const dup = await admin.post('/api/shot-lists').send({ name: 'Dup', views: [{ key: 'a', label: 'A', anchorKind: 'face' }, { key: 'a', label: 'B', anchorKind: 'face' }] });
    expect(dup.status).toBe(400);
    const badKey = await admin.post('/api/shot-lists').send({ name: 'Bad', views: [{ key: '../x', label: 'A', anchorKind: 'face' }] });
    expect(badKey.status).toBe(400);
    const badKind = await admin.post('/api/shot-lists').send({ name: 'Bad', views: [{ key: 'x', label: 'A', anchorKind: 'ear' }] });
    expect(badKind.status).toBe(400);
    const archiveDefault = await admin.patch(`/api/shot-lists/${DEFAULT_SHOT_LIST_ID}`).send({ archived: true });
    expect(archiveDefault.status).toBe(409);

    const temp = (await admin.post('/api/shot-lists').send({ name: 'Temporary', views: [{ key: 'x', label: 'X', anchorKind: 'face' }] })).body as ShotList;
    expect((await admin.patch(`/api/shot-lists/${temp.id}`).send({ archived: true })).status).toBe(200);
    const names = ((await practitioner.get('/api/shot-lists')).body as ShotList[]).map((l) => l.name);
    expect(names).not.toContain('Temporary');
    expect(((await admin.get('/api/shot-lists?all=1')).body as ShotList[]).map((l) => l.name)).toContain('Temporary');
    const { visit } = await patientWithVisit(t, practitioner, practitionerId);
    expect((await practitioner.put(`/api/visits/${visit.id}/shot-list`).send({ shotListId: temp.id })).status).toBe(409);
  });
});
