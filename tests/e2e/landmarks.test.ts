import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { renderSyntheticFace } from '../fixtures/synthetic-face.js';
import { browserAvailable, demoUser, launchBrowser, newTabletPage, screenshot, signIn, startServer, type RunningApp } from './harness.js';

/** Creates a patient and a visit and uploads one photo through the API, from inside the signed-in page. */
async function uploadFace(page: Page, jpegBase64: string, view: string) {
  return page.evaluate(
    async ({ b64, view }) => {
      const csrf = ((await (await fetch('/api/auth/csrf')).json()) as { token: string }).token;
      const json = async (url: string, body: unknown) => {
        const res = await fetch(url, { method: 'POST', headers: { 'Content-Type': 'application/json', 'X-CSRF-Token': csrf }, body: JSON.stringify(body) });
        if (!res.ok) throw new Error(`${url}: ${res.status} ${await res.text()}`);
        return res.json();
      };
      const me = await (await fetch('/api/auth/me')).json();
      const patient = await json('/api/patients', { firstName: 'Ines', lastName: 'Marlow', dateOfBirth: '1991-04-12' });
      const visit = await json(`/api/patients/${patient.id}/visits`, { startsAt: new Date().toISOString(), kind: 'treatment', practitionerId: me.id });
      const bytes = Uint8Array.from(atob(b64), (c) => c.charCodeAt(0));
      const form = new FormData();
      form.append('view', view);
      form.append('photo', new Blob([bytes], { type: 'image/jpeg' }), 'face.jpg');
      const res = await fetch(`/api/visits/${visit.id}/photos`, { method: 'POST', headers: { 'X-CSRF-Token': csrf }, body: form });
      if (res.status !== 201) throw new Error(`upload: ${res.status} ${await res.text()}`);
      const photo = await res.json();
      return { patientId: patient.id as string, photoId: photo.id as string, state: photo.alignmentState as string };
    },
    { b64: jpegBase64, view },
  );
}

describe.skipIf(!browserAvailable)('landmark editor and measurements in Chromium', () => {
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

  it('drags an anchor, saves, and shows the new aligned photo and measurements', async () => {
    const { context, page } = await newTabletPage(browser, { width: 1280, height: 900 });
    const u = demoUser('practitioner');
    await signIn(page, app.url, u.email, u.password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();

    const face = await renderSyntheticFace({ format: 'jpeg' });
    const { patientId, photoId, state } = await uploadFace(page, face.data.toString('base64'), 'frontal-rest');
    expect(state).toBe('aligning');

    await page.goto(`${app.url}/photos/${photoId}/landmarks`);
    // The screen polls until the background alignment is done.
    await page.getByTestId('alignment-state').filter({ hasText: 'Aligned' }).waitFor({ timeout: 60_000 });
    const aligned = page.getByTestId('aligned-photo');
    await aligned.waitFor();
    const srcBefore = await aligned.getAttribute('src');
    const widthCell = page.locator('[data-measure="Mouth width"]');
    const widthBefore = await widthCell.innerText();
    expect(widthBefore).toMatch(/IPD/);
    await screenshot(page, 'landmarks-editor-auto-1280x900');

    // Drag the left-eye anchor 30 px down with the mouse: its six eye points move with it.
    const anchor = page.getByRole('button', { name: "Anchor: Centre of the patient's left eye" });
    const box = (await anchor.boundingBox())!;
    const [x, y] = [box.x + box.width / 2, box.y + box.height / 2];
    await page.mouse.move(x, y);
    await page.mouse.down();
    for (let i = 1; i <= 6; i++) await page.mouse.move(x, y + i * 5);
    await page.mouse.up();
    const moved = (await anchor.boundingBox())!;
    expect(moved.y - box.y).toBeGreaterThan(20);

    await page.getByRole('button', { name: 'Save landmarks' }).click();
    await page.getByText('Placed by hand').first().waitFor();
    await expect.poll(() => aligned.getAttribute('src'), { timeout: 30_000 }).not.toBe(srcBefore);
    await expect.poll(() => widthCell.innerText()).not.toBe(widthBefore);
    // The new aligned image really loaded.
    await expect.poll(() => aligned.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth)).toBe(1200);
    await screenshot(page, 'landmarks-editor-manual-1280x900');

    // Undo is per edit; a zoom is no edit.
    await page.getByRole('button', { name: 'Zoom in' }).click();
    expect(await page.getByRole('button', { name: 'Undo' }).isDisabled()).toBe(true);

    // The measurements tab of the patient shows the photo with the target beside the ratio and the caution.
    await page.goto(`${app.url}/patients/${patientId}/measurements`);
    await page.getByText('Guides, not treatment targets').waitFor();
    await page.getByRole('button', { name: '1:1.6' }).click();
    await page.getByRole('heading', { name: 'Target ratio: 1:1.6' }).waitFor();
    const row = page.locator(`tr[data-photo="${photoId}"]`);
    await row.waitFor();
    expect(await row.innerText()).toMatch(/1:\d\.\d\d/);
    await row.getByRole('button', { name: 'Landmarks' }).click();
    await page.getByRole('img', { name: /Landmarks on the Frontal, at rest photo/ }).waitFor();
    await screenshot(page, 'measurements-tab-1280x900');
    await context.close();
  });

  it('places the anchors by tapping on a photo without a face', async () => {
    const { context, page } = await newTabletPage(browser, { width: 1024, height: 768 });
    const u = demoUser('practitioner');
    await signIn(page, app.url, u.email, u.password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    const face = await renderSyntheticFace({ format: 'jpeg' });
    const { photoId } = await uploadFace(page, face.data.toString('base64'), 'lateral-left');
    await page.goto(`${app.url}/photos/${photoId}/landmarks`);
    await page.getByTestId('alignment-state').filter({ hasText: 'Needs landmarks' }).waitFor({ timeout: 60_000 });
    const svg = page.getByRole('application');
    await svg.evaluate((el) => el.scrollIntoView({ block: 'end' }));
    const b = (await svg.boundingBox())!;
    for (const [i, [fx, fy]] of [[0.62, 0.44], [0.45, 0.58], [0.6, 0.8]].entries()) {
      await page.getByText(`(${i + 1} of 3)`).waitFor();
      await page.touchscreen.tap(b.x + b.width * fx, b.y + b.height * fy);
    }
    await page.getByRole('button', { name: 'Save landmarks' }).click();
    await page.getByTestId('alignment-state').filter({ hasText: 'Aligned' }).waitFor({ timeout: 30_000 });
    await page.getByTestId('aligned-photo').waitFor();
    await screenshot(page, 'landmarks-anchors-by-hand-1024x768');
    await context.close();
  });
});
