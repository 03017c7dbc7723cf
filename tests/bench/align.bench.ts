/**
 * `npm run bench:align`: the computational core on one 2048 px photo (an invented face, JPEG with sensor-like noise).
 *
 * - landmark step: `detectLandmarks(jpeg)`: decode + shrink to the model's working size + detector + 68-point net.
 * - bare inference, same run, same input: the model alone (`runLandmarkModel`) on the pixels the step feeds it.
 *   Also shown for information: the model on the full 2048 px pixels, which the step avoids by shrinking first.
 * - alignment: `alignPhoto`: transform fit + resample into the frontal frame (1200×1500) + JPEG encode.
 *   Also shown: the worker's variant (WebP and JPEG encodes plus raw pixels for the quality checks).
 * - measurements: `measureLips` + `estimatePose` + `poseWarnings` + `changeSince` on the detected points.
 *
 * Targets: landmark step / bare inference ≤ 1.2; alignment ≤ 150 ms; measurements ≤ 1 ms. Env: BENCH_N (default 15).
 */
import 'reflect-metadata';
import { performance } from 'node:perf_hooks';
import sharp from 'sharp';
import { alignPhoto, viewTransform } from '../../server/media/align.js';
import { decodeForModel, detectLandmarks, loadLandmarkModel, runLandmarkModel } from '../../server/media/landmarks.js';
import { changeSince, measureLips } from '../../server/media/measurements.js';
import { estimatePose, poseWarnings } from '../../server/media/pose.js';
import { anchorsFrom68, fitPoints, VIEWS } from '../../server/media/views.js';
import { renderSyntheticFace } from '../fixtures/synthetic-face.js';

const N = Number(process.env.BENCH_N ?? 15);

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

async function time<T>(n: number, f: () => Promise<T> | T): Promise<number[]> {
  const out: number[] = [];
  for (let i = 0; i < n; i++) {
    const t0 = performance.now();
    await f();
    out.push(performance.now() - t0);
  }
  return out;
}

async function main() {
  const face = await renderSyntheticFace({ width: 1638, height: 2048, format: 'png' });
  const noise = await sharp({ create: { width: 1638, height: 2048, channels: 3, background: '#000', noise: { type: 'gaussian', mean: 0, sigma: 4 } } }).raw().toBuffer();
  const jpeg = await sharp(face.data)
    .removeAlpha()
    .composite([{ input: noise, raw: { width: 1638, height: 2048, channels: 3 }, blend: 'add' }])
    .jpeg({ quality: 90 })
    .toBuffer();
  const fullRaw = await sharp(jpeg).removeAlpha().raw().toBuffer({ resolveWithObject: true });

  const t0 = performance.now();
  await loadLandmarkModel();
  const initMs = performance.now() - t0;

  const workInput = await decodeForModel(jpeg);
  const fullInput = { data: fullRaw.data, width: fullRaw.info.width, height: fullRaw.info.height, factor: 1 };
  // Warm-up: the first wasm calls compile kernels.
  for (let i = 0; i < 3; i++) {
    await detectLandmarks(jpeg);
    await runLandmarkModel(workInput);
  }

  // Interleaved so that background load on the machine falls on both alike.
  const step: number[] = [], bare: number[] = [];
  for (let i = 0; i < N; i++) {
    step.push(...(await time(1, () => detectLandmarks(jpeg))));
    bare.push(...(await time(1, () => runLandmarkModel(workInput))));
  }
  const bareFull = await time(Math.max(3, Math.floor(N / 3)), () => runLandmarkModel(fullInput));

  const found = await detectLandmarks(jpeg);
  if (!found) throw new Error('the bench face was not found');
  const view = VIEWS['frontal-rest'];
  const anchors = anchorsFrom68(view, found.points);
  const fitted = () => viewTransform(fitPoints(view, found.points, anchors));
  await alignPhoto(jpeg, view, fitted().transform, 0);
  const align = await time(N, () => { const f = fitted(); return alignPhoto(jpeg, view, f.transform, f.residual); });
  const alignStored = await time(Math.max(3, Math.floor(N / 3)), () => { const f = fitted(); return alignPhoto(jpeg, view, f.transform, f.residual, { formats: ['webp', 'jpeg'], raw: true }); });

  const baseline = measureLips(found.points);
  const basePose = estimatePose(view, found.points, anchors);
  const measureOnce = () => {
    const m = measureLips(found.points);
    const pose = estimatePose(view, found.points, anchors);
    poseWarnings(view, pose, basePose);
    changeSince(m, baseline);
  };
  for (let i = 0; i < 200; i++) measureOnce();
  const reps = 200;
  const measure = await time(N, () => {
    for (let i = 0; i < reps; i++) measureOnce();
  });

  const stepMs = median(step), bareMs = median(bare), ratio = stepMs / bareMs;
  const alignMs = median(align), measureMs = median(measure) / reps;
  const pad = (s: string) => s.padEnd(52);
  const mark = (ok: boolean) => (ok ? 'ok' : 'OVER TARGET');
  console.log(`align bench: ${face.width}×${face.height} JPEG (${(jpeg.length / 1024).toFixed(0)} KiB), N=${N}, Node ${process.version}`);
  console.log(`${pad('model load (once per process)')}${initMs.toFixed(1)} ms`);
  console.log(`${pad(`landmark step (decode → ${workInput.width}×${workInput.height} + model)`)}${stepMs.toFixed(1)} ms median`);
  console.log(`${pad('bare inference, same input')}${bareMs.toFixed(1)} ms median`);
  console.log(`${pad(`bare inference on full ${fullInput.width}×${fullInput.height} pixels (info)`)}${median(bareFull).toFixed(1)} ms median`);
  console.log(`${pad('ratio landmark step / bare inference')}${ratio.toFixed(3)}  (target ≤ 1.2: ${mark(ratio <= 1.2)})`);
  console.log(`${pad(`alignment (fit + resample ${view.frame.width}×${view.frame.height} + JPEG)`)}${alignMs.toFixed(1)} ms median  (target ≤ 150: ${mark(alignMs <= 150)})`);
  console.log(`${pad('alignment as stored (WebP + JPEG + raw) (info)')}${median(alignStored).toFixed(1)} ms median`);
  console.log(`${pad('measurements + pose + change since baseline')}${(measureMs * 1000).toFixed(1)} µs median  (target ≤ 1 ms: ${mark(measureMs <= 1)})`);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
