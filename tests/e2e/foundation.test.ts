import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { browserAvailable, demoUser, launchBrowser, newTabletPage, screenshot, signIn, startServer, TABLET_PORTRAIT, type RunningApp } from './harness.js';

describe.skipIf(!browserAvailable)('foundation in Chromium at tablet size', () => {
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

  const expectedNav = {
    admin: ['Clinic day', 'Patients', 'Stock', 'Admin'],
    practitioner: ['Clinic day', 'Patients', 'Stock'],
    coordinator: ['Clinic day', 'Patients', 'Stock'],
  } as const;

  for (const role of ['admin', 'practitioner', 'coordinator'] as const) {
    it(`signs in as ${role} and shows that role's navigation`, async () => {
      const { context, page } = await newTabletPage(browser);
      const u = demoUser(role);
      await signIn(page, app.url, u.email, u.password);
      await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
      const nav = page.getByRole('navigation', { name: 'Main' });
      const labels = (await nav.getByRole('link').allInnerTexts()).map((s) => s.trim());
      for (const label of expectedNav[role]) expect(labels).toContain(label);
      if (role !== 'admin') expect(labels).not.toContain('Admin');
      await screenshot(page, `clinic-day-${role}-1024x768`);
      await context.close();
    });
  }

  it('keeps a coordinator out of the users admin', async () => {
    const { context, page } = await newTabletPage(browser);
    const u = demoUser('coordinator');
    await signIn(page, app.url, u.email, u.password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    await page.goto(`${app.url}/admin/users`);
    await page.getByText('Not available for your role').waitFor();
    const apiStatus = await page.evaluate(async () => (await fetch('/api/users')).status);
    expect(apiStatus).toBe(403);
    await context.close();
  });

  it('shows an error for a wrong password', async () => {
    const { context, page } = await newTabletPage(browser, TABLET_PORTRAIT);
    await signIn(page, app.url, demoUser('practitioner').email, 'definitely-wrong');
    await page.getByText('E-mail or password is incorrect.').waitFor();
    await screenshot(page, `sign-in-error-768x1024`);
    expect(page.url()).toContain('/sign-in');
    await context.close();
  });

  it('creates a patient and finds it by search', async () => {
    const { context, page } = await newTabletPage(browser, TABLET_PORTRAIT);
    const u = demoUser('coordinator');
    await signIn(page, app.url, u.email, u.password);
    await page.getByRole('link', { name: 'Patients' }).click();
    await page.getByRole('button', { name: 'New patient' }).click();
    const dialog = page.getByRole('dialog', { name: 'New patient' });
    await dialog.getByRole('button', { name: 'Create patient' }).click();
    await dialog.getByText('Enter a first name.').waitFor();
    await dialog.getByLabel('First name').fill('Odile');
    await dialog.getByLabel('Last name').fill('Brackenbury');
    await dialog.getByLabel('Date of birth').fill('1989-03-14');
    await dialog.getByLabel('E-mail').fill('odile.b@mail.example');
    await dialog.getByRole('button', { name: 'Create patient' }).click();
    await page.getByRole('heading', { name: 'Odile Brackenbury' }).waitFor();
    await screenshot(page, 'patient-new-768x1024');

    await page.getByRole('link', { name: 'Patients' }).click();
    await page.getByLabel('Search patients').fill('bracken');
    await page.getByRole('link', { name: 'Brackenbury, Odile' }).waitFor();
    await page.getByLabel('Search patients').fill('14/03/1989');
    await page.getByRole('link', { name: 'Brackenbury, Odile' }).waitFor();
    await screenshot(page, 'patients-search-768x1024');
    await context.close();
  });
});

describe.skipIf(!browserAvailable)('automatic logoff', () => {
  let app: RunningApp;
  let browser: Browser;
  beforeAll(async () => {
    // 0.05 minutes = 3 seconds of inactivity (HIPAA 45 CFR 164.312(a)(2)(iii): automatic logoff).
    app = await startServer({ TWINFRAME_IDLE_MINUTES: '0.05' });
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  it('clears the screen and asks for a new sign-in after the idle time', async () => {
    const { context, page } = await newTabletPage(browser);
    const u = demoUser('practitioner');
    await signIn(page, app.url, u.email, u.password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    await page.getByText('You were signed out after a period without activity').waitFor({ timeout: 15_000 });
    expect(page.url()).toContain('/sign-in');
    const status = await page.evaluate(async () => (await fetch('/api/patients')).status);
    expect(status).toBe(401);
    await context.close();
  });
});
