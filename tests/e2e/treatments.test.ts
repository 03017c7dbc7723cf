import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import sharp from 'sharp';
import { browserAvailable, demoUser, launchBrowser, newTabletPage, screenshot, signIn, startServer, TABLET_LANDSCAPE, TABLET_PORTRAIT, type RunningApp } from './harness.js';
import { VIEW_BOX, ZONE_TARGETS } from '../../src/features/treatments/components/lip-diagram.js';
import type { ZoneKey } from '../../src/features/treatments/zones.js';

/** Taps a zone of the lip diagram with a touch event at a point inside that zone. */
async function tapZone(page: Page, zone: keyof typeof ZONE_TARGETS) {
  const svg = page.getByRole('group', { name: /Lip and lower-face diagram/ });
  await svg.scrollIntoViewIfNeeded();
  const box = (await svg.boundingBox())!;
  const [x, y] = ZONE_TARGETS[zone];
  const scale = Math.min(box.width / VIEW_BOX.width, box.height / VIEW_BOX.height);
  const offsetX = box.x + (box.width - VIEW_BOX.width * scale) / 2;
  const offsetY = box.y + (box.height - VIEW_BOX.height * scale) / 2;
  await page.touchscreen.tap(offsetX + (x - VIEW_BOX.x) * scale, offsetY + (y - VIEW_BOX.y) * scale);
}

async function todaysVisit(page: Page, kind: string, status?: string): Promise<{ id: string; patient: { firstName: string; lastName: string } }> {
  return page.evaluate(
    async ([k, s]) => {
      const day = (await (await fetch('/api/clinic-day')).json()) as { practitioners: { visits: { id: string; kind: string; status: string; patient: { firstName: string; lastName: string } }[] }[] };
      const all = day.practitioners.flatMap((p) => p.visits);
      return all.find((v) => v.kind === k && (!s || v.status === s))!;
    },
    [kind, status] as const,
  );
}

describe.skipIf(!browserAvailable)('treatment record in Chromium at tablet size', () => {
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

  it('records a treatment by tapping zones, shows the totals, and the review reminder reaches the clinic day', async () => {
    const { context, page } = await newTabletPage(browser, TABLET_LANDSCAPE);
    const u = demoUser('practitioner');
    await signIn(page, app.url, u.email, u.password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    const visit = await todaysVisit(page, 'treatment', 'in-progress');
    await page.goto(`${app.url}/visits/${visit.id}`);
    await page.getByRole('heading', { name: 'Treatment record' }).waitFor();
    await page.getByText('If you suspect a complication, stop and follow the clinic’s complication protocol.').waitFor();
    // No emergency doses anywhere on the screen.
    expect(await page.locator('main').innerText()).not.toMatch(/\b\d+\s*(units?|U)\s+of\s+hyaluronidase|hyaluronidase\s+\d/i);

    await page.getByLabel('Product', { exact: true }).selectOption({ label: 'Soft-gel HA lip filler with lidocaine (mL)' });
    await page.getByLabel('Lot number').fill('CW-24B-0193');
    const nextYear = `${new Date().getFullYear() + 1}-06-30`;
    await page.getByLabel('Expiry date').fill(nextYear);

    // Hand-computed: upper body right 2 × 0.1 + left 1 × 0.1 = 0.3 mL, lower body 2 × 0.1 per side = 0.4, cupid's bow 0.1,
    // upper border 0.1 per side = 0.2 → 1.0 mL, one 1 mL syringe (FACTS 17, common practice).
    for (let i = 0; i < 2; i++) await tapZone(page, 'upper-body-right');
    await tapZone(page, 'upper-body-left');
    for (let i = 0; i < 2; i++) await tapZone(page, 'lower-body-right');
    for (let i = 0; i < 2; i++) await tapZone(page, 'lower-body-left');
    await tapZone(page, 'cupids-bow');
    await tapZone(page, 'upper-vermilion-border-right');
    await tapZone(page, 'upper-vermilion-border-left');
    const amount = (zone: ZoneKey) => page.locator(`[data-zone-amount="${zone}"]`).innerText();
    expect(await amount('upper-body-right')).toBe('0.2');
    expect(await amount('upper-body-left')).toBe('0.1');
    expect(await amount('lower-body-right')).toBe('0.2');
    expect(await amount('lower-body-left')).toBe('0.2');
    expect(await amount('cupids-bow')).toBe('0.1');
    expect(await amount('upper-vermilion-border-right')).toBe('0.1');
    expect(await amount('upper-vermilion-border-left')).toBe('0.1');
    expect(await page.getByTestId('filler-total').innerText()).toBe('1 mL');
    await page.getByRole('button', { name: 'Linear threading' }).click();
    await screenshot(page, 'treatment-editor-1024x768');

    // A second line: the neuromodulator, into the DAO in units (filler zones are not offered for it).
    await page.getByRole('button', { name: 'Add product line' }).click();
    await page.getByLabel('Product', { exact: true }).selectOption({ label: 'Neuromodulator type A, 100 U vial (U)' });
    await page.getByLabel('Lot number').fill('HV-NM-5521');
    await page.getByLabel('Expiry date').fill(nextYear);
    for (let i = 0; i < 3; i++) await tapZone(page, 'dao-right');
    for (let i = 0; i < 3; i++) await tapZone(page, 'dao-left');
    expect(await amount('dao-right')).toBe('3');
    expect(await page.locator('g[data-zone="upper-body-right"]').getAttribute('aria-disabled')).toBe('true');

    await page.getByRole('button', { name: 'Record treatment' }).click();
    await page.getByText('Treatment recorded').waitFor();
    const saved = await page.getByText('Treatment recorded').locator('..').innerText();
    expect(saved).toContain('1 mL filler, 6 U neuromodulator');
    expect(saved).toMatch(/Review reminder e-mailed on/);
    await page.getByText('Treatment recorded').scrollIntoViewIfNeeded();
    await screenshot(page, 'treatment-saved-1024x768');

    // The stored record, read back from the API, has the hand-computed totals.
    const stored = await page.evaluate(async (id) => (await fetch(`/api/visits/${id}/treatment`)).json(), visit.id);
    expect(stored.totals.fillerMl).toBe(1);
    expect(stored.totals.toxinUBySide).toEqual({ right: 3, left: 3 });

    // The clinic day lists the review reminder, due 14 days after today.
    await page.goto(app.url);
    const reminders = page.getByRole('list', { name: 'Reminders' });
    await reminders.waitFor();
    const due = new Date(Date.now() + 14 * 86_400_000).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'Europe/London' });
    const row = reminders.locator('li', { hasText: `${visit.patient.firstName} ${visit.patient.lastName}` }).filter({ hasText: `Review · ${due}` });
    await row.waitFor();
    expect(await row.innerText()).toContain('Scheduled');
    await row.scrollIntoViewIfNeeded();
    await screenshot(page, 'clinic-day-reminders-1024x768');
    await context.close();
  });

  it("records a consultation with goals, a target ratio, a staged plan and the patient's reference picture", async () => {
    const { context, page } = await newTabletPage(browser, TABLET_LANDSCAPE);
    await signIn(page, app.url, demoUser('practitioner').email, demoUser('practitioner').password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    const visit = await todaysVisit(page, 'consultation');
    await page.goto(`${app.url}/visits/${visit.id}`);
    await page.getByRole('heading', { name: 'Consultation' }).waitFor();
    await page.getByRole('button', { name: 'More volume' }).click();
    await page.getByRole('button', { name: "A more defined cupid's bow" }).click();
    await page.getByLabel('In the patient’s words').fill('Fuller upper lip, still natural.');
    await page.getByLabel('Upper slightly smaller (1:1.6)').check();
    await page.getByRole('button', { name: 'Add stage' }).click();
    await page.getByRole('button', { name: 'Add stage' }).click();
    await page.getByLabel('Planned mL').first().fill('1');
    await page.getByRole('button', { name: 'Save consultation' }).click();
    await page.getByText(/^Saved /).waitFor();
    const picture = await sharp({ create: { width: 600, height: 400, channels: 3, background: '#c98f7e' } }).jpeg().toBuffer();
    await page.locator('input[type="file"]').setInputFiles({ name: 'lips-i-like.jpg', mimeType: 'image/jpeg', buffer: picture });
    await page.getByRole('button', { name: /Open reference picture/ }).waitFor();
    await page.getByRole('button', { name: 'Save consultation' }).evaluate((el) => el.scrollIntoView({ block: 'center' }));
    await screenshot(page, 'consultation-1024x768');
    const stored = await page.evaluate(async (id) => (await fetch(`/api/visits/${id}/consultation`)).json(), visit.id);
    expect(stored).toMatchObject({ goals: ['more-volume', 'cupids-bow-definition'], targetRatio: '1:1.6' });
    expect(stored.plan).toHaveLength(2);
    await context.close();
  });

  it('lays out the treatment screen in portrait and hides it from the front desk', async () => {
    const { context, page } = await newTabletPage(browser, TABLET_PORTRAIT);
    await signIn(page, app.url, demoUser('practitioner').email, demoUser('practitioner').password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    const visit = await todaysVisit(page, 'treatment', 'booked');
    await page.goto(`${app.url}/visits/${visit.id}`);
    await page.getByRole('heading', { name: 'Treatment record' }).waitFor();
    await tapZone(page, 'lower-body-left');
    await tapZone(page, 'oral-commissure-left');
    expect(await page.getByTestId('filler-total').innerText()).toBe('0.2 mL');
    // The demo patient was treated before: the screen shows the cumulative filler to date beside this visit's.
    expect(await page.getByTestId('patient-to-date').innerText()).toMatch(/^Earlier visits: [\d.]+ mL filler in \d+ sessions?, last on .+ With this visit: [\d.]+ mL\.$/);
    await page.getByRole('group', { name: /Lip and lower-face diagram/ }).scrollIntoViewIfNeeded();
    await screenshot(page, 'treatment-editor-768x1024');
    await context.close();

    const desk = await newTabletPage(browser, TABLET_PORTRAIT);
    await signIn(desk.page, app.url, demoUser('coordinator').email, demoUser('coordinator').password);
    await desk.page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    await desk.page.goto(`${app.url}/visits/${visit.id}`);
    await desk.page.getByRole('heading', { name: 'Open items' }).waitFor();
    expect(await desk.page.getByRole('heading', { name: 'Treatment record' }).count()).toBe(0);
    await desk.page.goto(app.url);
    await desk.page.getByRole('list', { name: 'Reminders' }).or(desk.page.getByText('No reminders due in the next four weeks.')).first().waitFor();
    await screenshot(desk.page, 'clinic-day-coordinator-768x1024');
    await desk.context.close();
  });
});
