/**
 * `npm run bench:compare`: how fast a comparison appears on a tablet, and what it costs on the wire.
 *
 * Data: one invented patient grown to 50 visits × 8 views through the real API (upload → ingest pipeline → automatic
 * landmarks and alignment), with camera-sized photos (tests/bench/compare-data.ts). Client: the production build,
 * served by the real app on loopback, in headless Chromium at 1024×768.
 *
 * Measured, from the change of the follow-up visit (the user's pick) to both photos of the pair decoded and a frame
 * painted (a requestAnimationFrame after the images are complete), median of 20:
 *  - a jump to a visit far away (nothing of it prefetched): the cold case, the one the target is for;
 *  - a step to the next visit (prefetched as a neighbour): the common case when going through a history.
 * Also: bytes of the two photos of a pair (what a new pair costs; only display-size or aligned WebP ever reach the
 * client), and the gzip size of the JavaScript the first screen loads. Targets: ≤ 300 ms, ≤ 600 KB per pair,
 * ≤ 200 KB initial JS (gzip). Env: BENCH_VISITS (default 50), BENCH_RUNS (default 20), BENCH_SCALE (default 3).
 */
import 'reflect-metadata';
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import type { Page } from 'playwright-core';
import sharp from 'sharp';
import { createApp } from '../../server/app.js';
import { loadConfig } from '../../server/config.js';
import { openDatabase } from '../../server/db/data-source.js';
import { DEMO_USERS, seedDemo } from '../../server/db/seed.js';
import { startS3Fake, startSmtpFake, type RunningService } from '../../server/dev-services.js';
import { createLogger } from '../../server/logger.js';
import { createMailer } from '../../server/mail/outbox.js';
import { createSmtpTransport } from '../../server/mail/transport.js';
import { createObjectStore } from '../../server/storage/object-store.js';
import { launchBrowser, newTabletPage, signIn, TABLET_LANDSCAPE } from '../e2e/harness.js';
import { ApiSession, growPatient, waitForAlignment } from './compare-data.js';
import { ALIGNED_WEBP_QUALITY } from '../../server/media/align.js';

const VISITS = Number(process.env.BENCH_VISITS ?? 50);
const RUNS = Number(process.env.BENCH_RUNS ?? 20);
const SCALE = Number(process.env.BENCH_SCALE ?? 3);

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};
const mark = (ok: boolean) => (ok ? 'met' : 'NOT met');
const pad = (s: string) => s.padEnd(58);

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address() as net.AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}

type Visit = { id: string; startsAt: string; photos: Record<string, { id: string; alignmentState: string; variants: { variant: string; format: string; url: string }[] }> };

/*
 * Runs in the page. Kept as source text: the bench runs under tsx, whose esbuild adds a `__name` helper to named
 * functions, and a helper the page does not have would break a serialised function.
 */
const PICK_WATCH = `(want) => new Promise((resolve, reject) => {
  const label = [...document.querySelectorAll('label')].find((l) => l.textContent === 'Follow-up');
  const el = label ? document.getElementById(label.htmlFor) : null;
  if (!el) return reject(new Error('no follow-up picker'));
  el.addEventListener('change', () => {
    const t0 = performance.now();
    const check = () => {
      const imgs = [...document.querySelectorAll('img[data-photo-src]')].slice(0, 2);
      const ready = imgs.length === 2 && imgs[1].getAttribute('src') === want && imgs.every((i) => i.complete && i.naturalWidth > 0);
      if (ready) requestAnimationFrame(() => resolve(performance.now() - t0));
      else requestAnimationFrame(check);
    };
    check();
    setTimeout(() => reject(new Error('no paint of ' + want + ' within 20 s')), 20000);
  }, { once: true, capture: true });
})`;

/**
 * Picks `visitId` as the follow-up and resolves with the ms from the select's change event to both photos of the
 * pair complete and one frame painted. The expected follow-up URL tells the new photo from the old one.
 */
async function timePick(page: Page, visitId: string, expectSrc: string): Promise<number> {
  const done = page.evaluate(`(${PICK_WATCH})(${JSON.stringify(expectSrc)})`) as Promise<number>;
  await page.waitForTimeout(20);
  await page.getByLabel('Follow-up', { exact: true }).selectOption(visitId);
  return done;
}

async function main() {
  const work = fs.mkdtempSync(path.join(os.tmpdir(), 'twinframe-bench-compare-'));
  const services: RunningService[] = [];
  try {
    // The production client, built apart from dist/ so a running server or test keeps its files.
    const outDir = path.join(work, 'client');
    execFileSync(process.execPath, ['node_modules/vite/bin/vite.js', 'build', '--outDir', outDir, '--emptyOutDir', '--logLevel', 'warn'], { stdio: 'inherit' });

    const [port, s3Port, smtpPort] = [await freePort(), await freePort(), await freePort()];
    const config = loadConfig({ TWINFRAME_DATA_DIR: work, S3_FAKE_PORT: String(s3Port), SMTP_FAKE_PORT: String(smtpPort), TWINFRAME_DEMO: '1', TWINFRAME_DEMO_PHOTOS: '0' });
    services.push(await startS3Fake(path.join(work, 'objects'), s3Port, config.s3.bucket));
    services.push(await startSmtpFake(path.join(work, 'mail'), smtpPort));
    const storage = createObjectStore(config.s3);
    await storage.ensureBucket();
    const db = await openDatabase(path.join(work, 'bench.sqlite'));
    await seedDemo(db);
    const logger = createLogger('warn');
    const mailer = createMailer({ db, storage, transport: createSmtpTransport(config.smtp), from: config.smtp.from, logger });
    const app = createApp({ db, config, logger, storage, mailer }, { staticDir: outDir });
    const server = app.listen(port, '127.0.0.1');
    const base = `http://127.0.0.1:${port}`;

    const prac = DEMO_USERS.find((u) => u.role === 'practitioner')!;
    const api = new ApiSession(base);
    const me = await api.signIn(prac.email, prac.password);
    const patient = await api.call<{ id: string }>('POST', '/api/patients', { firstName: 'Wren', lastName: 'Benchley', dateOfBirth: '1990-05-05', email: 'wren@mail.example' });
    const t0 = Date.now();
    let last = 0;
    await growPatient(api, {
      patientId: patient.id,
      practitionerId: me.id,
      visits: VISITS,
      seed: 11,
      scale: SCALE,
      onProgress: (d, n) => {
        if (Date.now() - last > 15_000 || d === n) {
          last = Date.now();
          process.stdout.write(`  data: ${d}/${n} photos uploaded (${Math.round((Date.now() - t0) / 1000)} s)\n`);
        }
      },
    });
    const aligned = await waitForAlignment(api, patient.id);
    console.log(`  data: ${VISITS} visits × 8 views in ${Math.round((Date.now() - t0) / 1000)} s; ${aligned.aligned} aligned, ${aligned.needsLandmarks} need landmarks by hand`);
    const timeline = await api.call<{ visits: Visit[] }>('GET', `/api/patients/${patient.id}/timeline`);
    const visits = timeline.visits.filter((v) => v.photos['frontal-rest']);
    // The photo the screen shows: aligned when aligned, else as taken (the client's own rule).
    const srcOf = (v: Visit) => {
      const p = v.photos['frontal-rest'];
      const aligned = p.alignmentState === 'aligned' ? p.variants.find((x) => x.variant === 'aligned' && x.format === 'webp') : undefined;
      return (aligned ?? p.variants.find((x) => x.variant === 'display' && x.format === 'webp'))!.url;
    };

    const browser = await launchBrowser();
    try {
      const first = await newTabletPage(browser, TABLET_LANDSCAPE);
      const page = first.page;
      // First screen: every script the sign-in page loads, gzip-compressed as a server would send it.
      const scripts = new Set<string>();
      page.on('request', (r) => {
        if (r.resourceType() === 'script') scripts.add(new URL(r.url()).pathname);
      });
      await page.goto(`${base}/sign-in`);
      await page.getByRole('button', { name: 'Sign in' }).waitFor();
      await page.waitForLoadState('networkidle');
      const firstJs = [...scripts].map((p) => zlib.gzipSync(fs.readFileSync(path.join(outDir, p)), { level: 9 }).length);
      const initialGzip = firstJs.reduce((a, b) => a + b, 0);
      await first.context.close();

      const imageBytes = new Map<string, number>();
      const jsonBytes: number[] = [];
      /** A signed-in compare screen with an empty cache (a fresh browser context), frontal rest, defaults on screen. */
      const openCompare = async () => {
        const { context, page } = await newTabletPage(browser, TABLET_LANDSCAPE);
        page.on('crash', () => console.error('  page crashed'));
        page.on('pageerror', (e) => console.error('  page error:', e.message));
        page.on('response', async (res) => {
          const u = new URL(res.url());
          const body = u.pathname.startsWith('/api/') ? await res.body().catch(() => null) : null;
          if (!body) return;
          if (u.pathname.startsWith('/api/photos/') && u.pathname.endsWith('/file')) imageBytes.set(u.pathname + u.search, body.length);
          else if (u.pathname.endsWith('/compare')) jsonBytes.push(body.length);
        });
        await signIn(page, base, prac.email, prac.password);
        await page.waitForURL(`${base}/`);
        await page.goto(`${base}/patients/${patient.id}/compare?view=frontal-rest`);
        await page.waitForFunction(() => [...document.querySelectorAll<HTMLImageElement>('img[data-photo-src]')].filter((i) => i.complete && i.naturalWidth > 0).length >= 2);
        await page.waitForTimeout(500);
        return { context, page };
      };

      // Cold jumps: each picked visit is neither shown nor a prefetched neighbour of one shown before. Every third
      // visit keeps them apart; a second pass in a fresh browser context (empty cache) takes the ones in between.
      const cold: number[] = [];
      const pairBytes: number[] = [];
      const passes = [[] as number[], [] as number[]];
      for (let i = 3; i < visits.length - 2; i += 3) passes[0].push(i);
      for (let i = 4; i < visits.length - 2; i += 3) passes[1].push(i);
      for (const pass of passes) {
        if (cold.length >= RUNS) break;
        const { context, page } = await openCompare();
        for (const i of pass) {
          if (cold.length >= RUNS) break;
          cold.push(await timePick(page, visits[i].id, srcOf(visits[i])));
          const a = imageBytes.get(srcOf(visits[0])) ?? 0;
          const b = imageBytes.get(srcOf(visits[i])) ?? 0;
          if (a && b) pairBytes.push(a + b);
          // Let the neighbours' prefetch finish, as it would while the user looks at the pair.
          await page.waitForTimeout(300);
        }
        await context.close();
      }
      // Steps to the next visit, which the screen prefetched as a neighbour of the current follow-up.
      const step: number[] = [];
      {
        const { context, page } = await openCompare();
        let current = 1;
        await timePick(page, visits[current].id, srcOf(visits[current]));
        for (let k = 0; k < RUNS && current + 1 < visits.length - 1; k++) {
          await page.waitForTimeout(300);
          current += 1;
          step.push(await timePick(page, visits[current].id, srcOf(visits[current])));
        }
        await context.close();
      }
      const master = [...imageBytes.keys()].filter((k) => k.includes('variant=master')).length;
      const formats = [...new Set([...imageBytes.keys()].map((k) => /variant=(\w+)&format=(\w+)/.exec(k)?.slice(1).join('/') ?? '?'))];

      // The drawn portraits compress far better than photographs of skin and hair do. For the weight of real photos,
      // a real photograph (the astronaut portrait of Debian's python3-skimage data, public domain) is encoded at the
      // aligned variant's settings (ALIGNED_WEBP_QUALITY, effort 2) at its own resolution, and its bytes per pixel are
      // scaled to two frontal aligned frames (1200×1500 each).
      const ASTRONAUT = '/usr/lib/python3/dist-packages/skimage/data/astronaut.png';
      let realPairKb: number | null = null;
      if (fs.existsSync(ASTRONAUT)) {
        const real = await sharp(ASTRONAUT).removeAlpha().webp({ quality: ALIGNED_WEBP_QUALITY, effort: 2 }).toBuffer({ resolveWithObject: true });
        realPairKb = ((real.data.length / (real.info.width * real.info.height)) * 1200 * 1500 * 2) / 1000;
      }
      const coldMs = median(cold), stepMs = median(step), pairKb = median(pairBytes) / 1000, jsKb = initialGzip / 1000;
      console.log(`compare bench: ${VISITS} visits × 8 views, photos ${SCALE}× the drawn portrait with sensor noise, Chromium ${browser.version()}, loopback, N=${RUNS}`);
      console.log(`${pad('pick a far visit → both photos painted (cold)')}${coldMs.toFixed(0)} ms median (min ${Math.min(...cold).toFixed(0)}, max ${Math.max(...cold).toFixed(0)})  (target ≤ 300: ${mark(coldMs <= 300)}, ratio ${(coldMs / 300).toFixed(2)})`);
      console.log(`${pad('step to the next visit → both painted (prefetched)')}${stepMs.toFixed(0)} ms median (min ${Math.min(...step).toFixed(0)}, max ${Math.max(...step).toFixed(0)})`);
      console.log(`${pad('bytes per pair (two photos)')}${pairKb.toFixed(0)} KB median  (target ≤ 600: ${mark(pairKb <= 600)}, ratio ${(pairKb / 600).toFixed(2)})`);
      if (realPairKb !== null) console.log(`${pad('  estimate for real photographs (see comment)')}${realPairKb.toFixed(0)} KB  (target ≤ 600: ${mark(realPairKb <= 600)}, ratio ${(realPairKb / 600).toFixed(2)})`);
      console.log(`${pad('compare answer per pair (JSON, info)')}${(median(jsonBytes) / 1000).toFixed(1)} KB median`);
      console.log(`${pad('photo variants fetched')}${formats.join(', ')}; master fetched ${master} times`);
      console.log(`${pad(`initial JS of the first screen (${firstJs.length} files, gzip -9)`)}${jsKb.toFixed(1)} KB  (target ≤ 200: ${mark(jsKb <= 200)}, ratio ${(jsKb / 200).toFixed(2)})`);
    } finally {
      await browser.close();
      server.close();
      await mailer.stop();
      await db.destroy();
    }
  } finally {
    await Promise.allSettled(services.map((s) => s.close()));
    fs.rmSync(work, { recursive: true, force: true });
  }
  process.exit(0);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
