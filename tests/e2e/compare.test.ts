import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { AxeBuilder } from '@axe-core/playwright';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { browserAvailable, demoUser, launchBrowser, newTabletPage, pageApi, screenshot, signIn, startServer, TABLET_LANDSCAPE, TABLET_PORTRAIT, type RunningApp } from './harness.js';

const run = promisify(execFile);


/** Serious and critical findings of axe-core on the page as it is now (WCAG rules and best practices). */
async function axeProblems(page: Page): Promise<string[]> {
  const result = await new AxeBuilder({ page }).analyze();
  return result.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => `${v.id} (${v.impact}): ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`);
}

/** True when every photo of the comparison on screen is downloaded, decoded and has pixels. */
const photosPainted = (page: Page, n: number) =>
  page.waitForFunction(
    (count) => {
      const imgs = [...document.querySelectorAll<HTMLImageElement>('img[data-photo-src]')];
      return imgs.length >= count && imgs.slice(0, count).every((i) => i.complete && i.naturalWidth > 0);
    },
    n,
    { timeout: 20_000 },
  );

/** Every image inside the viewport has loaded (lazy ones further away are left alone). */
const visibleImagesLoaded = (page: Page) =>
  page.waitForFunction(
    () =>
      [...document.querySelectorAll<HTMLImageElement>('img')]
        .filter((i) => {
          const r = i.getBoundingClientRect();
          return r.bottom > 0 && r.top < innerHeight && r.right > 0 && r.left < innerWidth;
        })
        .every((i) => i.complete && i.naturalWidth > 0),
    undefined,
    { timeout: 20_000 },
  );

const sliderValue = async (page: Page) => Number(await page.getByRole('slider').getAttribute('aria-valuenow'));

type TimelineVisit = { id: string; startsAt: string; photos: Record<string, { id: string; alignmentState: string }> };

describe.skipIf(!browserAvailable)('compare and review in Chromium', () => {
  let app: RunningApp;
  let browser: Browser;
  let patientId: string;
  let patientName: string;
  let listName: string;
  let others: string[];
  let frontal: TimelineVisit[];

  beforeAll(async () => {
    app = await startServer({ TWINFRAME_DEMO_PHOTOS: '1' });
    browser = await launchBrowser();
    const { page, context } = await newTabletPage(browser);
    const u = demoUser('practitioner');
    await signIn(page, app.url, u.email, u.password);
    await page.getByRole('heading', { name: 'Clinic day' }).waitFor();
    const all = await pageApi<{ items: { id: string; code: string; firstName: string; lastName: string }[] }>(page, 'GET', '/api/patients?pageSize=100');
    const p = all.body.items.find((x) => x.code === 'LR-0001')!;
    patientId = p.id;
    patientName = `${p.firstName} ${p.lastName}`;
    listName = `${p.lastName}, ${p.firstName}`;
    others = all.body.items.filter((x) => x.id !== p.id).flatMap((x) => [`${x.firstName} ${x.lastName}`, x.lastName]);
    // Demo photos are stored and aligned in the background after start: wait until this patient's are settled.
    for (let i = 0; ; i++) {
      const tl = await pageApi<{ visits: TimelineVisit[] }>(page, 'GET', `/api/patients/${patientId}/timeline`);
      frontal = tl.body.visits.filter((v) => v.photos['frontal-rest']);
      const settled = frontal.length >= 3 && tl.body.visits.every((v) => Object.values(v.photos).every((ph) => ph.alignmentState !== 'aligning'));
      if (settled && app.output().includes('Demo photos:')) break;
      if (i > 240) throw new Error(`demo photos did not arrive:\n${app.output()}`);
      await page.waitForTimeout(1000);
    }
    await context.close();
  });
  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  for (const viewport of [TABLET_LANDSCAPE, TABLET_PORTRAIT]) {
    const size = `${viewport.width}x${viewport.height}`;

    it(`compares baseline and latest frontal rest in each mode, reviews with the patient and hands over the sheet (${size})`, { timeout: 240_000 }, async () => {
      const { page, context } = await newTabletPage(browser, viewport);
      const u = demoUser('practitioner');
      await signIn(page, app.url, u.email, u.password);
      await page.getByRole('heading', { name: 'Clinic day' }).waitFor();

      // Open the demo patient and the timeline tab.
      await page.goto(`${app.url}/patients`);
      await page.getByRole('link', { name: listName }).click();
      await page.getByRole('link', { name: 'Timeline' }).click();
      await page.getByRole('heading', { name: 'Timeline' }).waitFor();
      await expect.poll(() => page.locator('tbody tr').count()).toBeGreaterThanOrEqual(frontal.length);
      // Thumbnails on screen loaded (the rest load lazily as the list scrolls).
      await visibleImagesLoaded(page);
      await screenshot(page, `compare-timeline-${size}`);
      expect(await axeProblems(page)).toEqual([]);

      // Compare: frontal rest, the first and the latest visit with that view by default.
      await page.getByRole('link', { name: 'Compare', exact: true }).click();
      await page.getByRole('heading', { name: /^Compare/ }).waitFor();
      await photosPainted(page, 2);
      const first = frontal[0], latest = frontal[frontal.length - 1];
      expect(await page.getByLabel('View', { exact: true }).inputValue()).toBe('frontal-rest');
      expect(await page.getByLabel('Baseline', { exact: true }).inputValue()).toBe(first.id);
      expect(await page.getByLabel('Follow-up', { exact: true }).inputValue()).toBe(latest.id);
      // Aligned photos by default, never the master; originals on request.
      const srcs = await page.locator('img[data-photo-src]').evaluateAll((els) => els.map((e) => e.getAttribute('src')!));
      expect(srcs).toEqual([
        expect.stringContaining(`/api/photos/${first.photos['frontal-rest'].id}/file?variant=aligned&format=webp`),
        expect.stringContaining(`/api/photos/${latest.photos['frontal-rest'].id}/file?variant=aligned&format=webp`),
      ]);
      await page.getByRole('heading', { name: 'Measurements', exact: true }).waitFor();
      await expect.poll(() => page.getByText(/guides for discussion, not treatment targets/).first().isVisible()).toBe(true);
      await screenshot(page, `compare-side-by-side-${size}`);
      expect(await axeProblems(page)).toEqual([]);

      await page.getByRole('button', { name: 'Aligned' }).click();
      await expect.poll(() => page.locator('img[data-photo-src]').first().getAttribute('src')).toContain('variant=display&format=webp');
      await photosPainted(page, 2);
      await page.getByRole('button', { name: 'Aligned' }).click();
      await page.getByRole('button', { name: 'Landmarks' }).click();
      await expect.poll(() => page.getByTestId('landmark-overlay').count()).toBe(2);
      await screenshot(page, `compare-landmarks-${size}`);
      await page.getByRole('button', { name: 'Landmarks' }).click();

      // Slider: keyboard, mouse drag and touch drag on the handle.
      await page.getByRole('radio', { name: 'Slider' }).click();
      await photosPainted(page, 2);
      const handle = page.getByRole('slider');
      await handle.waitFor();
      expect(await sliderValue(page)).toBe(50);
      await handle.focus();
      for (let i = 0; i < 5; i++) await page.keyboard.press('ArrowLeft');
      await expect.poll(() => sliderValue(page)).toBe(40);
      await page.keyboard.press('ArrowRight');
      await expect.poll(() => sliderValue(page)).toBe(42);
      const box = (await page.getByTestId('compare-slider').boundingBox())!;
      const button = (await page.locator('.__rcs-handle-button').boundingBox())!;
      await page.mouse.move(button.x + button.width / 2, button.y + button.height / 2);
      await page.mouse.down();
      await page.mouse.move(box.x + box.width * 0.25, button.y + button.height / 2, { steps: 8 });
      await page.mouse.up();
      await expect.poll(async () => Math.abs((await sliderValue(page)) - 25)).toBeLessThanOrEqual(2);
      const touch = await context.newCDPSession(page);
      const b2 = (await page.locator('.__rcs-handle-button').boundingBox())!;
      const y = b2.y + b2.height / 2;
      await touch.send('Input.dispatchTouchEvent', { type: 'touchStart', touchPoints: [{ x: b2.x + b2.width / 2, y }] });
      for (let k = 1; k <= 8; k++) await touch.send('Input.dispatchTouchEvent', { type: 'touchMove', touchPoints: [{ x: b2.x + b2.width / 2 + ((box.x + box.width * 0.8 - (b2.x + b2.width / 2)) * k) / 8, y }] });
      await touch.send('Input.dispatchTouchEvent', { type: 'touchEnd', touchPoints: [] });
      await expect.poll(async () => Math.abs((await sliderValue(page)) - 80)).toBeLessThanOrEqual(2);
      await screenshot(page, `compare-slider-${size}`);

      // Strip: every visit with this view, oldest first.
      await page.getByRole('radio', { name: 'All visits' }).click();
      const strip = page.getByRole('list', { name: /every visit in time order/ });
      await expect.poll(() => strip.getByRole('listitem').count()).toBe(frontal.length);
      await visibleImagesLoaded(page);
      await screenshot(page, `compare-strip-${size}`);

      // Switching views keeps the chosen visits.
      await page.getByRole('radio', { name: 'Side by side' }).click();
      const second = frontal[1];
      await page.getByLabel('Baseline', { exact: true }).selectOption(second.id);
      await photosPainted(page, 2);
      await page.getByLabel('View', { exact: true }).selectOption('lips-rest');
      await expect.poll(() => page.getByLabel('View', { exact: true }).inputValue()).toBe('lips-rest');
      expect(await page.getByLabel('Baseline', { exact: true }).inputValue()).toBe(second.id);
      expect(await page.getByLabel('Follow-up', { exact: true }).inputValue()).toBe(latest.id);
      await expect.poll(() => page.locator('img[data-photo-src]').first().getAttribute('src')).toContain(`/api/photos/${second.photos['lips-rest']?.id}`);
      await photosPainted(page, 2);
      await screenshot(page, `compare-lips-${size}`);
      await page.getByLabel('View', { exact: true }).selectOption('frontal-rest');
      await page.getByLabel('Baseline', { exact: true }).selectOption(first.id);
      await photosPainted(page, 2);

      // Comparison sheet: download and read it back with pdftotext (poppler), an outside PDF reader.
      await page.getByRole('button', { name: 'Comparison sheet' }).click();
      const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Download PDF' }).click()]);
      const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tf-sheet-'));
      const file = path.join(dir, 'sheet.pdf');
      await download.saveAs(file);
      const { stdout: text } = await run('pdftotext', ['-layout', file, '-']);
      fs.rmSync(dir, { recursive: true, force: true });
      expect(download.suggestedFilename()).toMatch(/^comparison-frontal-rest-\d{4}-\d{2}-\d{2}\.pdf$/);
      expect(text).toContain('Comparison sheet');
      expect(text).toContain(patientName);
      expect(text).toContain('Frontal, at rest');
      expect(text).toMatch(/Upper : lower lip\s+1:\d\.\d\s+1:\d\.\d/);
      expect(text).toMatch(/Results vary/);
      expect(text).toMatch(/guides for discussion, not treatment targets/);
      await page.getByRole('button', { name: 'Close', exact: true }).click();

      // Review mode: full screen, this patient only, leaving needs the staff password.
      await page.getByRole('button', { name: 'Review mode' }).click();
      await page.waitForURL(`${app.url}/review`);
      await page.getByRole('heading', { name: /your results/ }).waitFor();
      await photosPainted(page, 2);
      const body = await page.locator('body').innerText();
      for (const name of others) expect(body, name).not.toContain(name);
      expect(await page.getByRole('navigation').count()).toBe(0);
      await screenshot(page, `compare-review-${size}`);
      expect(await axeProblems(page)).toEqual([]);
      // Typing another address does not leave review mode, and the API refuses other patients.
      await page.goto(`${app.url}/patients`);
      await page.waitForURL(`${app.url}/review`);
      expect((await pageApi(page, 'GET', '/api/patients')).status).toBe(403);
      await page.getByRole('heading', { name: /your results/ }).waitFor();
      await page.getByRole('button', { name: 'Staff: end review' }).click();
      await page.getByLabel('Your password').fill('not the password');
      await page.getByRole('button', { name: 'End review', exact: true }).click();
      await page.getByText(/That is not your password/).waitFor();
      expect(page.url()).toBe(`${app.url}/review`);
      await page.getByLabel('Your password').fill(u.password);
      await page.getByRole('button', { name: 'End review', exact: true }).click();
      await page.waitForURL(/\/compare\?view=frontal-rest/);
      await page.getByRole('heading', { name: /^Compare/ }).waitFor();
      await context.close();
    });
  }
});
