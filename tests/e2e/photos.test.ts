import { createHash } from 'node:crypto';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { browserAvailable, demoUser, launchBrowser, newTabletPage, screenshot, signIn, startServer, type RunningApp } from './harness.js';

/** A camera-sized JPEG with noise, so its upload takes long enough to show progress on a throttled link. */
async function cameraJpeg(seed: number): Promise<Buffer> {
  const [w, h] = [2000, 1500];
  const noise = await sharp({ create: { width: w, height: h, channels: 3, background: '#000', noise: { type: 'gaussian', mean: 120 + seed * 10, sigma: 40 } } }).raw().toBuffer();
  return sharp(noise, { raw: { width: w, height: h, channels: 3 } }).jpeg({ quality: 92 }).toBuffer();
}
const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');

/** The API as the signed-in page sees it (same cookies and CSRF token as the app). */
async function apiJson<T>(page: Page, path: string): Promise<T> {
  return page.evaluate(async (p) => (await fetch(p)).json(), path) as Promise<T>;
}

interface VisitJson {
  id: string;
  patientId: string;
  startsAt: string;
  status: string;
}

/** Today's visit of a demo patient who also has an earlier visit (so a guide photo can come from it). */
async function visitWithHistory(page: Page): Promise<{ visit: VisitJson; earlier: VisitJson }> {
  const day = await apiJson<{ practitioners: { visits: VisitJson[] }[] }>(page, '/api/clinic-day');
  for (const v of day.practitioners.flatMap((p) => p.visits)) {
    if (v.status === 'cancelled') continue;
    const visits = await apiJson<VisitJson[]>(page, `/api/patients/${v.patientId}/visits`);
    const earlier = visits.find((x) => x.startsAt < v.startsAt && x.status !== 'cancelled');
    if (earlier) return { visit: v, earlier };
  }
  throw new Error('the demo clinic has no visit today with an earlier visit');
}

describe.skipIf(!browserAvailable)('photo capture in Chromium at tablet size', () => {
  let app: RunningApp;
  let browser: Browser;

  beforeAll(async () => {
    app = await startServer();
    browser = await launchBrowser(['--use-fake-device-for-media-stream', '--use-fake-ui-for-media-stream']);
  });
  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  it('uploads three dropped files with progress and shows each thumbnail in its view slot', async () => {
    const { context, page } = await newTabletPage(browser);
    const u = demoUser('practitioner');
    await signIn(page, app.url, u.email, u.password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    const { visit } = await visitWithHistory(page);

    await page.goto(`${app.url}/visits/${visit.id}/photos`);
    await page.getByRole('heading', { name: 'Photos', exact: true }).waitFor();
    await page.locator('article[data-view="frontal-rest"][data-state="empty"]').waitFor();

    // A slow uplink (about 8 Mbit/s) so each upload's progress can be seen between 0 and 100 %.
    const cdp = await context.newCDPSession(page);
    await cdp.send('Network.enable');
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 20, downloadThroughput: -1, uploadThroughput: 1024 * 1024 });

    // Named out of order: the screen sorts by name (camera numbering) and assigns views in shot-list order.
    const files = [
      { name: 'IMG_0103.jpg', mimeType: 'image/jpeg', buffer: await cameraJpeg(3) },
      { name: 'IMG_0101.jpg', mimeType: 'image/jpeg', buffer: await cameraJpeg(1) },
      { name: 'IMG_0102.jpg', mimeType: 'image/jpeg', buffer: await cameraJpeg(2) },
    ];
    await page.getByTestId('bulk-input').setInputFiles(files);
    const expected: Record<string, string> = { 'IMG_0101.jpg': 'frontal-rest', 'IMG_0102.jpg': 'frontal-smile', 'IMG_0103.jpg': 'lips-rest' };
    for (const [name, view] of Object.entries(expected)) expect(await page.getByLabel(`View of ${name}`).inputValue()).toBe(view);

    // Record every progress value the upload bars show.
    await page.evaluate(() => {
      const seen: number[] = [];
      (window as unknown as { __progress: number[] }).__progress = seen;
      new MutationObserver(() => {
        for (const el of document.querySelectorAll('section[aria-label="Uploads"] [role="progressbar"]')) seen.push(Number(el.getAttribute('aria-valuenow')));
      }).observe(document.body, { subtree: true, attributes: true, attributeFilter: ['aria-valuenow'], childList: true });
    });
    await page.getByRole('button', { name: 'Upload 3 photos' }).click();
    await page.locator('section[aria-label="Uploads"] [role="progressbar"]').first().waitFor();
    await screenshot(page, 'photos-uploading-1024x768');
    await page.locator('[data-upload-status="done"]').nth(2).waitFor({ timeout: 60_000 });
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });

    const seen = await page.evaluate(() => (window as unknown as { __progress: number[] }).__progress);
    expect(seen.some((v) => v > 0 && v < 100), `progress values seen: ${seen.join(',')}`).toBe(true);
    expect(seen).toContain(100);

    // Each slot shows its own photo's thumbnail, and the server stored each file under the view shown.
    const stored = await apiJson<{ id: string; viewKey: string; sourceSha256: string }[]>(page, `/api/visits/${visit.id}/photos`);
    for (const [name, view] of Object.entries(expected)) {
      const file = files.find((f) => f.name === name)!;
      const photo = stored.find((p) => p.viewKey === view);
      expect(photo?.sourceSha256, view).toBe(sha256(file.buffer));
      const slot = page.locator(`article[data-view="${view}"]`);
      await slot.locator('img').first().waitFor();
      expect(await slot.getAttribute('data-state')).toBe('captured');
      const img = slot.locator('img').first();
      expect(await img.getAttribute('src')).toContain(photo!.id);
      expect(await img.evaluate((el: HTMLImageElement) => el.complete && el.naturalWidth > 0)).toBe(true);
    }
    expect(await page.locator('article[data-view="lips-pucker"]').getAttribute('data-state')).toBe('empty');
    await page.locator('article[data-view="frontal-rest"]').scrollIntoViewIfNeeded();
    await screenshot(page, 'photos-uploaded-1024x768');

    // The patient's photos: a row for this visit with the three thumbnails, opening at display size.
    await page.goto(`${app.url}/patients/${visit.patientId}/photos`);
    const thumbs = page.getByRole('button', { name: /Frontal, at rest|Frontal, smiling|Lips close-up, at rest/ });
    await expect.poll(() => thumbs.count()).toBe(3);
    await page.getByRole('button', { name: /^Frontal, at rest/ }).click();
    const viewer = page.getByRole('dialog', { name: 'Frontal, at rest' });
    await viewer.getByRole('img').first().waitFor();
    await screenshot(page, 'patient-photos-viewer-1024x768');
    await context.close();
  });

  it('takes a photo with the in-page camera, with the previous visit as a guide', async () => {
    const { context, page } = await newTabletPage(browser);
    const u = demoUser('practitioner');
    await signIn(page, app.url, u.email, u.password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    const { visit, earlier } = await visitWithHistory(page);

    // The earlier visit gets a photo of the same view, uploaded as the capture screen does it.
    const guide = await cameraJpeg(5);
    const status = await page.evaluate(
      async ({ visitId, bytes }) => {
        const { token } = await (await fetch('/api/auth/csrf')).json();
        const form = new FormData();
        form.append('view', 'lips-pucker');
        form.append('photo', new Blob([new Uint8Array(bytes)], { type: 'image/jpeg' }), 'earlier.jpg');
        return (await fetch(`/api/visits/${visitId}/photos`, { method: 'POST', body: form, headers: { 'X-CSRF-Token': token } })).status;
      },
      { visitId: earlier.id, bytes: [...guide] },
    );
    expect(status).toBe(201);

    await page.goto(`${app.url}/visits/${visit.id}/photos`);
    const slot = page.locator('article[data-view="lips-pucker"]');
    await slot.getByRole('button', { name: 'Camera' }).click();
    const dialog = page.getByRole('dialog', { name: /Camera/ });
    await dialog.getByTestId('camera-overlay').waitFor();
    await dialog.getByLabel('Guide strength').fill('0.6');
    expect(await dialog.getByTestId('camera-overlay').evaluate((el: HTMLElement) => el.style.opacity)).toBe('0.6');
    const take = dialog.getByRole('button', { name: 'Take photo' });
    await expect.poll(() => take.isEnabled(), { timeout: 15_000 }).toBe(true);
    await screenshot(page, 'photos-camera-1024x768');
    await take.click();
    await dialog.getByRole('button', { name: 'Save photo' }).click();

    await slot.locator('img').first().waitFor({ timeout: 30_000 });
    await expect.poll(() => slot.getAttribute('data-state')).toBe('captured');
    const photos = await apiJson<{ viewKey: string; width: number; height: number; captureTimeSource: string }[]>(page, `/api/visits/${visit.id}/photos`);
    const shot = photos.find((p) => p.viewKey === 'lips-pucker');
    // The fake camera's frame, stored through the same pipeline: a real image with its own size, no EXIF time.
    expect(shot?.width).toBeGreaterThan(100);
    expect(shot?.height).toBeGreaterThan(100);
    expect(shot?.captureTimeSource).toBe('upload');
    await context.close();
  });

  it('says why an upload failed and lets it be retried', async () => {
    const { context, page } = await newTabletPage(browser);
    const u = demoUser('practitioner');
    await signIn(page, app.url, u.email, u.password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    const { visit } = await visitWithHistory(page);
    await page.goto(`${app.url}/visits/${visit.id}/photos`);
    const slot = page.locator('article[data-view="oblique-left"]');
    await slot.waitFor();

    // The server refuses a file that is not a photo, and the slot says why.
    await page.getByLabel('Photo file for Oblique left 45°').setInputFiles({ name: 'notes.jpg', mimeType: 'image/jpeg', buffer: Buffer.from('not a photo at all\n'.repeat(50)) });
    await slot.getByRole('alert').filter({ hasText: 'not a photo Twinframe can read' }).waitFor();
    expect(await slot.getAttribute('data-state')).toBe('failed');
    // Sending the same file again would fail the same way, so it is not offered.
    const refusedRow = page.locator('[data-upload-status="failed"]').filter({ hasText: 'notes.jpg' });
    expect(await refusedRow.getByRole('button', { name: 'Try again' }).count()).toBe(0);

    // With the network gone the upload fails; back online, "Try again" stores it.
    const cdp = await context.newCDPSession(page);
    await cdp.send('Network.enable');
    await cdp.send('Network.emulateNetworkConditions', { offline: true, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    await page.getByLabel('Photo file for Oblique left 45°').setInputFiles({ name: 'oblique.jpg', mimeType: 'image/jpeg', buffer: await cameraJpeg(7) });
    const failedRow = page.locator('[data-upload-status="failed"]').filter({ hasText: 'oblique.jpg' });
    await failedRow.getByText('connection to Twinframe was lost').waitFor();
    await screenshot(page, 'photos-upload-failed-1024x768');
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    await failedRow.getByRole('button', { name: 'Try again' }).click();
    await page.locator('[data-upload-status="done"]').filter({ hasText: 'oblique.jpg' }).waitFor({ timeout: 30_000 });
    await expect.poll(() => slot.getAttribute('data-state')).toBe('captured');
    await context.close();
  });

  it('lets the admin see and edit the shot lists', async () => {
    const { context, page } = await newTabletPage(browser);
    const u = demoUser('admin');
    await signIn(page, app.url, u.email, u.password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    await page.goto(`${app.url}/admin/shot-lists`);
    await page.getByRole('heading', { name: 'Shot lists' }).waitFor();
    const views = page.getByRole('list', { name: 'Views in order' }).getByRole('listitem');
    await expect.poll(() => views.count()).toBe(8);
    await page.getByRole('button', { name: 'New shot list' }).click();
    await page.getByLabel('Name', { exact: true }).fill('Lips only');
    await page.getByRole('button', { name: 'Add view' }).click();
    await page.getByLabel('View name', { exact: true }).fill('Lips at rest');
    expect(await page.getByLabel('Key', { exact: true }).inputValue()).toBe('lips-at-rest');
    await page.getByRole('button', { name: 'Save shot list' }).click();
    await page.getByRole('navigation', { name: 'Shot lists' }).getByRole('button', { name: /Lips only/ }).waitFor();
    await screenshot(page, 'shot-lists-admin-1024x768');
    await context.close();
  });
});
