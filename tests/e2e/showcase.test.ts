import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { browserAvailable, demoUser, launchBrowser, newTabletPage, pageApi, screenshot, signIn, startServer, TABLET_PORTRAIT, type RunningApp } from './harness.js';


describe.skipIf(!browserAvailable)('showcase in Chromium: request, clear, export, withdraw', () => {
  let app: RunningApp;
  let browser: Browser;

  beforeAll(async () => {
    app = await startServer({ TWINFRAME_DEMO_PHOTOS: '1' });
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  it('runs the whole permission chain and the withdrawal cascade', { timeout: 300_000 }, async () => {
    const admin = await newTabletPage(browser);
    await signIn(admin.page, app.url, demoUser('admin').email, demoUser('admin').password);
    await admin.page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    const found = await pageApi<{ items: { id: string }[] }>(admin.page, 'GET', '/api/patients?q=LR-0001');
    const patientId = found.body.items[0].id;

    // Demo photos are stored in the background after start: wait for this patient's frontal views…
    for (let i = 0; ; i++) {
      // …and for their landmarks: a lips-only export is cropped from them.
      const photos = await pageApi<{ viewKey: string; state: string; alignmentState: string }[]>(admin.page, 'GET', `/api/patients/${patientId}/photos`);
      const frontal = photos.body.filter((p) => p.viewKey === 'frontal-rest' && p.state === 'captured');
      if (frontal.length >= 2 && frontal.every((p) => p.alignmentState === 'aligned')) break;
      if (i > 120) throw new Error('demo photos did not arrive');
      await admin.page.waitForTimeout(1000);
    }

    // The patient signs the showcase consent on a second device (a code, as in the waiting room).
    const forms = await pageApi<{ id: string; kind: string; status: string }[]>(admin.page, 'GET', '/api/consent-templates');
    const showcaseForm = forms.body.find((f) => f.kind === 'showcase' && f.status === 'published')!;
    const started = await pageApi<{ code: string }>(admin.page, 'POST', '/api/handovers', { patientId, templateIds: [showcaseForm.id], mode: 'second-device' });
    expect(started.status).toBe(201);
    const device = await newTabletPage(browser, TABLET_PORTRAIT);
    await device.page.goto(`${app.url}/handover`);
    expect((await pageApi(device.page, 'POST', '/api/handover/claim', { code: started.body.code })).status).toBe(200);
    const form = await pageApi<{ forms: { templateId: string; questions: { id: string; type: string; flagWhen?: string[]; options?: string[] }[] }[] }>(device.page, 'GET', '/api/handover');
    const answers = Object.fromEntries(form.body.forms[0].questions.map((q) => [q.id, q.type === 'yes-no' ? 'yes' : q.type === 'choice' ? q.options![0] : 'n/a']));
    const signature = await device.page.evaluate(() => {
      const c = Object.assign(document.createElement('canvas'), { width: 600, height: 200 });
      const g = c.getContext('2d')!;
      g.lineWidth = 5;
      g.beginPath();
      g.moveTo(30, 140);
      g.bezierCurveTo(90, 30, 160, 180, 240, 80);
      g.lineTo(560, 120);
      g.stroke();
      return c.toDataURL('image/png');
    });
    const signed = await pageApi<{ consentId: string }>(device.page, 'POST', `/api/handover/forms/${showcaseForm.id}/sign`, {
      answers,
      channels: ['clinic-website'],
      crop: 'lips-only',
      signerName: 'Aurelie Fenwick',
      signature,
    });
    expect(signed.status, JSON.stringify(signed.body)).toBe(201);
    await device.context.close();

    // The practitioner nominates the before/after pair shown on the compare screen.
    const practitioner = await newTabletPage(browser);
    await signIn(practitioner.page, app.url, demoUser('practitioner').email, demoUser('practitioner').password);
    await practitioner.page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    const p = practitioner.page;
    await p.goto(`${app.url}/patients/${patientId}/compare?view=frontal-rest`);
    await p.getByRole('link', { name: 'Showcase…' }).click();
    await p.getByRole('heading', { name: 'Nominate a result' }).waitFor();
    expect(await p.getByLabel('View').inputValue()).toBe('frontal-rest');
    await expect.poll(() => p.locator('button[aria-pressed="true"]').count()).toBe(2);
    await p.getByRole('checkbox', { name: 'Clinic website' }).check();
    await p.getByRole('button', { name: 'Request clearance' }).click();
    await p.getByText('Request sent to the clinic admin for clearance.').waitFor();
    await p.getByText('Awaiting clearance').first().waitFor();
    await screenshot(p, 'showcase-patient-tab-1024x768');

    // The admin clears it and exports it for the website.
    await admin.page.goto(`${app.url}/admin/showcase`);
    await admin.page.getByRole('button', { name: 'Clear for showcase' }).first().click();
    await admin.page.getByRole('button', { name: 'Cleared' }).click();
    await admin.page.getByRole('button', { name: 'Export for Clinic website' }).first().click();
    await admin.page.getByRole('link', { name: 'composite' }).first().waitFor();
    await screenshot(admin.page, 'showcase-queue-cleared-1024x768');

    // The patient withdraws the showcase consent (recorded by staff); everything stops at once.
    expect((await pageApi(admin.page, 'POST', `/api/consents/${signed.body.consentId}/withdraw`, { reason: 'Patient phoned the clinic.' })).status).toBe(200);
    await admin.page.getByRole('button', { name: 'Withdrawn' }).click();
    await admin.page.getByText('Showcase consent withdrawn by the patient.').first().waitFor();
    expect(await admin.page.getByRole('link', { name: 'composite' }).count()).toBe(0);
    expect(await admin.page.getByRole('button', { name: /Export for/ }).count()).toBe(0);
    await screenshot(admin.page, 'showcase-queue-withdrawn-1024x768');
    await admin.context.close();
    await practitioner.context.close();
  });
});
