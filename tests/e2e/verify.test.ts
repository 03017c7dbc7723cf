import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { alterOneByte, signaturePng } from '../helpers/consents.js';
import { browserAvailable, demoUser, launchBrowser, newTabletPage, pageApi, screenshot, signIn, startServer, TABLET_LANDSCAPE, TABLET_PORTRAIT, type RunningApp } from './harness.js';

const PHONE = { width: 390, height: 844 };

type Template = { id: string; kind: string; status: string; title: string; questions: { id: string; type: string; required: boolean; options?: string[]; flagWhen?: string[] }[] };

/** A demo patient signs the photography consent through the API of a signed-in page; returns the stored PDF. */
async function signedConsentPdf(page: Page, baseUrl: string): Promise<{ pdf: Buffer; title: string }> {
  const staff = demoUser('practitioner');
  await signIn(page, baseUrl, staff.email, staff.password);
  await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
  const templates = (await pageApi<Template[]>(page, 'GET', '/api/consent-templates')).body;
  const form = templates.find((t) => t.kind === 'photography' && t.status === 'published')!;
  const patients = (await pageApi<{ items: { id: string }[] }>(page, 'GET', '/api/patients?q=Łukasiewicz')).body.items;
  expect((await pageApi(page, 'POST', '/api/handovers', { patientId: patients[0].id, templateIds: [form.id], mode: 'this-device' })).status).toBe(201);
  expect((await pageApi(page, 'POST', `/api/handover/forms/${form.id}/shown`, {})).status).toBe(200);
  const answers: Record<string, string> = {};
  for (const q of form.questions) if (q.required) answers[q.id] = q.type === 'yes-no' ? (q.flagWhen?.includes('yes') ? 'no' : 'yes') : (q.options?.[0] ?? 'none');
  const signed = await pageApi<{ consentId: string }>(page, 'POST', `/api/handover/forms/${form.id}/sign`, { answers, signerName: 'Zoë Łukasiewicz-Řezníčková', signature: await signaturePng() });
  expect(signed.status).toBe(201);
  await signIn(page, baseUrl, staff.email, staff.password);
  await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
  const base64 = await page.evaluate(async (id) => {
    const bytes = new Uint8Array(await (await fetch(`/api/consents/${id}/pdf`)).arrayBuffer());
    let s = '';
    for (const b of bytes) s += String.fromCharCode(b);
    return btoa(s);
  }, signed.body.consentId);
  return { pdf: Buffer.from(base64, 'base64'), title: form.title };
}

describe.skipIf(!browserAvailable)('the public verify page and the admin record-integrity screen in Chromium', () => {
  let app: RunningApp;
  let browser: Browser;
  let pdf: Buffer;
  let title: string;

  beforeAll(async () => {
    app = await startServer();
    browser = await launchBrowser();
    const { context, page } = await newTabletPage(browser, TABLET_PORTRAIT);
    ({ pdf, title } = await signedConsentPdf(page, app.url));
    await context.close();
  });
  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  it('checks a genuine PDF and a changed copy on a phone, with no sign-in', async () => {
    const { context, page } = await newTabletPage(browser, PHONE);
    await page.goto(`${app.url}/verify`);
    await page.getByRole('heading', { name: 'Check a consent document' }).waitFor();
    await page.getByText(/It is signed by “Linden Row Aesthetics” with the certificate/).waitFor();
    await screenshot(page, 'verify-empty-390x844');
    // Nothing overflows sideways on a phone.
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);

    await page.getByLabel('PDF to check').setInputFiles({ name: 'consent.pdf', mimeType: 'application/pdf', buffer: pdf });
    const answer = page.getByTestId('verify-answer');
    await answer.getByText('Signed consent record, unchanged').waitFor();
    await expect.poll(() => answer.innerText()).toMatch(new RegExp(`signed consent record of \\d{1,2} \\w+ \\d{4}, form “${title}” v1, current`));
    expect(await answer.innerText()).not.toMatch(/Łukasiewicz|Zoë/);
    await answer.scrollIntoViewIfNeeded();
    await screenshot(page, 'verify-genuine-390x844');

    await page.getByLabel('PDF to check').setInputFiles({ name: 'consent-edited.pdf', mimeType: 'application/pdf', buffer: alterOneByte(pdf) });
    await answer.getByText('Not a record of this clinic, or altered').waitFor();
    await answer.scrollIntoViewIfNeeded();
    await screenshot(page, 'verify-altered-390x844');
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
    await context.close();
  });

  it('checks a typed hash and explains a refused file at tablet sizes', async () => {
    const { context, page } = await newTabletPage(browser, TABLET_PORTRAIT);
    await page.goto(`${app.url}/sign-in`);
    await page.getByRole('link', { name: 'Check a consent document' }).click();
    await page.getByRole('heading', { name: 'Check a consent document' }).waitFor();
    await page.getByLabel('Or type its SHA-256').fill('not-a-hash');
    await page.getByRole('button', { name: 'Check', exact: true }).click();
    await page.getByText(/64 hexadecimal characters/).first().waitFor();
    const { createHash } = await import('node:crypto');
    await page.getByLabel('Or type its SHA-256').fill(createHash('sha256').update(pdf).digest('hex').toUpperCase());
    await page.getByRole('button', { name: 'Check', exact: true }).click();
    await page.getByTestId('verify-answer').getByText('Signed consent record, unchanged').waitFor();
    await screenshot(page, 'verify-hash-768x1024');

    await page.setViewportSize(TABLET_LANDSCAPE);
    await page.getByLabel('PDF to check').setInputFiles({ name: 'photo.pdf', mimeType: 'application/pdf', buffer: Buffer.from('GIF89a not a pdf at all') });
    await page.getByText(/This file is not a PDF/).waitFor();
    await screenshot(page, 'verify-refused-1024x768');
    await context.close();
  });

  it('shows admins the chain heads and a full check, at both tablet orientations', async () => {
    for (const viewport of [TABLET_LANDSCAPE, TABLET_PORTRAIT]) {
      const { context, page } = await newTabletPage(browser, viewport);
      const admin = demoUser('admin');
      await signIn(page, app.url, admin.email, admin.password);
      await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
      await page.goto(`${app.url}/admin`);
      await page.getByRole('link', { name: /Record integrity/ }).click();
      await page.getByRole('heading', { name: 'Record integrity' }).waitFor();
      await page.getByText('Consent records', { exact: true }).waitFor();
      await page.getByLabel('Head hash of Access log').waitFor();
      await page.getByRole('button', { name: 'Check all chains now' }).click();
      const result = page.getByTestId('integrity-check');
      await result.getByText('Every chain verifies from its first row to its head').waitFor();
      expect(await result.getByText('Intact').count()).toBe(3);
      await screenshot(page, `integrity-${viewport.width}x${viewport.height}`);
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(viewport.width);
      await context.close();
    }
  });
});
