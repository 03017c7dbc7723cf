import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Router } from 'express';
import { makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { patientWithVisit, photoLikeJpeg, upload } from '../helpers/photos.js';

/**
 * The front desk sees no clinical photo and no comparison (DESIGN §2). Every registered route that serves photos,
 * landmarks, comparisons, measurements or review mode answers a coordinator 403, called with real ids so the refusal
 * cannot be a 404 in disguise.
 */
const CLINICAL_PATH = /\/(photos|landmarks|timeline|compare|comparison-sheet|pairs|measurements|review)(\/|$)|^\/api\/photos\//;

let t: TestApp;
let desk: Client;
let ids: Record<string, string>;

beforeAll(async () => {
  t = await makeTestApp();
  const { client: prac, user } = await signedIn(t, 'practitioner');
  const { patient, visit } = await patientWithVisit(t, prac, user.id);
  const res = await upload(prac, visit.id, await photoLikeJpeg(400, 500, 1), { view: 'frontal-rest' });
  ids = { id: patient.id, visitId: visit.id, photoId: res.body.id };
  desk = (await signedIn(t, 'coordinator')).client;
});
afterAll(() => t.close());

function routes(router: Router): [string, string][] {
  const out: [string, string][] = [];
  for (const layer of router.stack as { route?: { path: string; methods: Record<string, boolean> } }[]) {
    if (!layer.route) continue;
    for (const m of Object.keys(layer.route.methods)) if (m !== '_all') out.push([m.toUpperCase(), layer.route.path]);
  }
  return out;
}

describe('front desk and clinical photos', () => {
  it('gets 403 on every photo and comparison route', async () => {
    const clinical = routes(t.app.apiRouter).filter(([, p]) => CLINICAL_PATH.test(p) && !p.startsWith('/api/shot-lists'));
    // The routes of this area: photos, compare and review at least.
    expect(clinical.map(([m, p]) => `${m} ${p}`)).toEqual(
      expect.arrayContaining([
        'GET /api/photos/:id/file',
        'GET /api/patients/:id/photos',
        'GET /api/patients/:id/timeline',
        'GET /api/patients/:id/compare',
        'GET /api/patients/:id/pairs',
        'GET /api/patients/:id/measurements',
        'POST /api/patients/:id/comparison-sheet',
        'POST /api/patients/:id/comparison-sheet/email',
        'POST /api/patients/:id/review',
        'GET /api/review',
        'POST /api/review/exit',
      ]),
    );
    const failures: string[] = [];
    for (const [method, path] of clinical) {
      // Real ids: the patient, its visit and its photo (":id" is the photo on /api/photos routes).
      const url = path
        .replace(':visitId', ids.visitId)
        .replace(/^\/api\/photos\/:id/, `/api/photos/${ids.photoId}`)
        .replace(':id', ids.id);
      const call = method === 'GET' ? desk.get(url) : (desk as unknown as Record<string, (u: string) => ReturnType<Client['post']>>)[method.toLowerCase()](url).send({});
      const res = await call;
      if (res.status !== 403) failures.push(`${method} ${path}: ${res.status}`);
    }
    expect(failures).toEqual([]);
  });
});
