import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { browserAvailable, demoUser, launchBrowser, newTabletPage, screenshot, signIn, startServer, TABLET_PORTRAIT, type RunningApp } from './harness.js';

/** Draws a signature-like stroke with the mouse across the pad. */
async function drawSignature(page: Page) {
  const pad = page.getByRole('img', { name: 'Signature pad' });
  await pad.scrollIntoViewIfNeeded();
  const box = (await pad.boundingBox())!;
  const y = box.y + box.height * 0.6;
  await page.mouse.move(box.x + 30, y);
  await page.mouse.down();
  for (let i = 1; i <= 40; i++) {
    const x = box.x + 30 + (i / 40) * (box.width - 80);
    await page.mouse.move(x, y - Math.sin(i / 4) * box.height * 0.25, { steps: 2 });
  }
  await page.mouse.up();
  await page.mouse.move(box.x + box.width * 0.3, y + 20);
  await page.mouse.down();
  await page.mouse.move(box.x + box.width * 0.6, y - 30, { steps: 10 });
  await page.mouse.up();
}

describe.skipIf(!browserAvailable)('consent hand-over in Chromium at 768×1024', () => {
  let app: RunningApp;
  let browser: Browser;

  beforeAll(async () => {
    app = await startServer();
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  it('hands the tablet to the patient, who signs two forms with the mouse; staff then see them verified with their PDFs', async () => {
    const { context, page } = await newTabletPage(browser, TABLET_PORTRAIT);
    const staff = demoUser('practitioner');
    await signIn(page, app.url, staff.email, staff.password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();

    await page.getByRole('link', { name: 'Patients' }).click();
    await page.getByLabel('Search patients').fill('Łukasiewicz');
    await page.getByRole('link', { name: /Łukasiewicz-Řezníčková, Zoë/ }).click();
    await page.getByRole('link', { name: 'Consents' }).click();
    await page.getByText('Nothing signed yet').waitFor();
    await page.getByRole('button', { name: 'Hand over for signing' }).click();
    const dialog = page.getByRole('dialog', { name: 'Hand-over for signing' });
    await dialog.getByText('Consent to clinical photography').click();
    await dialog.getByText('Showcase consent: showing my results').click();
    await dialog.getByRole('radio', { name: /This tablet/ }).check();
    await screenshot(page, 'handover-start-768x1024');
    await dialog.getByRole('button', { name: 'Hand this tablet over' }).click();

    // The patient's side: only the forms, one at a time.
    await page.waitForURL(/\/handover$/);
    await page.getByRole('heading', { name: 'Hello Zoë' }).waitFor();
    expect(await page.getByRole('navigation').count()).toBe(0);
    await page.getByRole('button', { name: 'Start' }).click();

    await page.getByRole('heading', { name: 'Consent to clinical photography' }).waitFor();
    await page.getByRole('button', { name: 'Sign this form' }).click();
    await page.getByText('Please answer this question.').first().waitFor();
    for (const group of await page.getByRole('radiogroup').all()) await group.getByRole('radio', { name: 'Yes' }).click();
    await page.getByLabel('Your full name').fill('Zoë Łukasiewicz-Řezníčková');
    await drawSignature(page);
    await screenshot(page, 'handover-photography-signed-768x1024');
    await page.getByRole('button', { name: 'Sign this form' }).click();

    await page.getByRole('heading', { name: 'Showcase consent: showing my results' }).waitFor();
    // Nothing is ticked for the patient (GDPR Recital 32).
    for (const box of await page.getByRole('checkbox').all()) expect(await box.isChecked()).toBe(false);
    expect(await page.getByRole('radio', { name: 'My whole face' }).isChecked()).toBe(false);
    await page.getByRole('checkbox', { name: 'Clinic website' }).check();
    await page.getByRole('radio', { name: 'Only a close crop of my lips' }).check();
    await page.getByRole('radiogroup').first().getByRole('radio', { name: 'Yes' }).click();
    await page.getByLabel('Your full name').fill('Zoë Łukasiewicz-Řezníčková');
    await drawSignature(page);
    await page.getByRole('button', { name: 'Undo last stroke' }).click();
    await page.getByRole('button', { name: 'Clear and sign again' }).click();
    await drawSignature(page);
    await page.getByRole('button', { name: 'Sign this form' }).click();

    await page.getByText('Please hand the tablet back to the clinic.').waitFor();
    await screenshot(page, 'handover-finished-768x1024');
    // No way out: the back button stays here, and the session reaches no staff data.
    await page.goBack();
    expect(page.url()).toMatch(/\/handover$/);
    expect(await page.evaluate(async () => (await fetch('/api/patients')).status)).toBe(403);

    // Back to staff: a staff sign-in is needed.
    await page.getByRole('button', { name: 'Clinic staff: sign in' }).click();
    await page.getByLabel('E-mail').fill(staff.email);
    await page.getByLabel('Password').fill(staff.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    await page.getByRole('link', { name: 'Patients' }).click();
    await page.getByLabel('Search patients').fill('Łukasiewicz');
    await page.getByRole('link', { name: /Łukasiewicz-Řezníčková, Zoë/ }).click();
    await page.getByRole('link', { name: 'Consents' }).click();

    const photo = page.locator('[data-testid^="consent-"]', { hasText: 'Consent to clinical photography' });
    await photo.getByText('Current').waitFor();
    await photo.getByRole('button', { name: 'Verify' }).click();
    await photo.getByText('Verified: unchanged since signing').waitFor();
    const showcase = page.locator('[data-testid^="consent-"]', { hasText: 'Showcase consent' });
    await showcase.getByText('Clinic website · lips-only crop').waitFor();
    await page.getByText(/E-mailed \d/).first().waitFor({ timeout: 30_000 });
    await screenshot(page, 'patient-consents-768x1024');

    const href = await photo.getByRole('link', { name: 'Open PDF' }).getAttribute('href');
    const pdf = await page.evaluate(async (url) => {
      const res = await fetch(url!);
      const bytes = new Uint8Array(await res.arrayBuffer());
      return { status: res.status, type: res.headers.get('content-type'), head: String.fromCharCode(...bytes.slice(0, 5)), size: bytes.length };
    }, href);
    expect(pdf).toMatchObject({ status: 200, type: 'application/pdf', head: '%PDF-' });
    expect(pdf.size).toBeGreaterThan(10_000);
    await context.close();
  });

  it('shows the admin the published forms and the outbox with the signed copies', async () => {
    const { context, page } = await newTabletPage(browser, TABLET_PORTRAIT);
    const admin = demoUser('admin');
    await signIn(page, app.url, admin.email, admin.password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    await page.goto(`${app.url}/admin/consent-forms`);
    await page.getByRole('heading', { name: 'Consent forms' }).waitFor();
    await expect.poll(() => page.getByText('published', { exact: true }).count()).toBe(4);
    await page.getByRole('button', { name: 'Read' }).first().click();
    await page.getByText(/SHA-256 [0-9a-f]{64}/).waitFor();
    await screenshot(page, 'consent-forms-768x1024');
    await page.keyboard.press('Escape');
    await page.goto(`${app.url}/admin/outbox`);
    await page.getByText('Your signed clinical photography consent from Linden Row Aesthetics').waitFor();
    await page.getByText('Your signed clinical photography consent from Linden Row Aesthetics').click();
    await page.getByText(/SHA-256 of the attached PDF: [0-9a-f]{64}/).waitFor();
    await screenshot(page, 'outbox-768x1024');
    await context.close();
  });
});
