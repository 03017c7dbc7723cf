/**
 * `npm run bench:ingest`: the whole photo pipeline against the libvips floor on one camera-sized JPEG.
 *
 * Floor: bare sharp — decode, auto-orient, encode one JPEG of the same size (quality 92, like the master).
 * Pipeline: `ingestPhoto` — header check, EXIF read, one decode, master + display + thumbnail in WebP and JPEG,
 * SHA-256, five writes through the S3 SDK to the local S3 fake, the database row in a transaction.
 * The steps after storing (landmarks…) are not timed here.
 *
 * The parent process makes the fixture and runs the S3 fake. One child process times floor and pipeline interleaved
 * (so changes in the machine's load hit both alike); two more children run only the floor or only the pipeline, so
 * each peak RSS is that path's own, not the fixture generator's or the fake's.
 * Targets: median ratio pipeline/floor ≤ 1.5, peak RSS ≤ 600 MB. Env: BENCH_N (runs of each, default 7).
 */
import 'reflect-metadata';
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';

const W = 6000;
const H = 4000;
const N = Number(process.env.BENCH_N ?? 7);
const BUCKET = 'twinframe-bench';

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

/** A 24-megapixel camera-like JPEG: a smooth scene with sensor-like noise, EXIF orientation 6, capture time, camera. */
async function makeFixture(file: string) {
  const scene = `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}">
    <defs><radialGradient id="s" cx="0.5" cy="0.45" r="0.6"><stop offset="0" stop-color="#e9c3a8"/><stop offset="1" stop-color="#7a5a48"/></radialGradient></defs>
    <rect width="100%" height="100%" fill="#9aa3a8"/><ellipse cx="${W / 2}" cy="${H / 2}" rx="${W / 5}" ry="${H / 2.6}" fill="url(#s)"/>
    <ellipse cx="${W / 2}" cy="${H * 0.68}" rx="${W / 14}" ry="${H / 40}" fill="#b5545a"/></svg>`;
  const base = await sharp(Buffer.from(scene)).removeAlpha().raw().toBuffer();
  const noise = await sharp({ create: { width: W, height: H, channels: 3, background: '#000', noise: { type: 'gaussian', mean: 0, sigma: 6 } } }).raw().toBuffer();
  await sharp(base, { raw: { width: W, height: H, channels: 3 } })
    .composite([{ input: noise, raw: { width: W, height: H, channels: 3 }, blend: 'add' }])
    .jpeg({ quality: 90 })
    .withMetadata({ orientation: 6 })
    .withExif({ IFD0: { Make: 'Examplecam', Model: 'Examplecam Q7', Artist: 'Bench' }, IFD2: { DateTimeOriginal: '2025:03:14 10:15:00' } })
    .toFile(file);
}

async function child(mode: 'time' | 'floor' | 'pipeline', fixture: string, endpoint: string) {
  const { openDatabase } = await import('../../server/db/data-source.js');
  const { loadConfig } = await import('../../server/config.js');
  const { createLogger } = await import('../../server/logger.js');
  const { createObjectStore } = await import('../../server/storage/object-store.js');
  const { ingestPhoto, renderVariants } = await import('../../server/media/ingest.js');
  const { Patient } = await import('../../server/entities/patient.js');
  const { User } = await import('../../server/entities/user.js');
  const { Visit } = await import('../../server/entities/visit.js');
  const { newId, nowIso } = await import('../../server/lib/time.js');

  const config = loadConfig({ S3_ENDPOINT: endpoint, S3_BUCKET: BUCKET });
  const storage = createObjectStore(config.s3);
  await storage.ensureBucket();
  const db = await openDatabase(':memory:');
  const deps = { db, storage, config, logger: createLogger('silent') };
  const now = nowIso();
  const user = { id: newId(), email: 'bench@clinic.example', name: 'Bench', role: 'practitioner' as const, passwordHash: 'x', active: true, createdAt: now, updatedAt: now };
  await db.getRepository(User).insert(user);
  const patient = { id: newId(), code: 'B-0001', firstName: 'Bench', lastName: 'Mark', dateOfBirth: '1990-01-01', email: null, phone: null, archived: false, createdAt: now, updatedAt: now };
  await db.getRepository(Patient).insert(patient);

  const bytes = fs.readFileSync(fixture);
  const floor = async () => {
    await sharp(bytes).rotate().jpeg({ quality: 92 }).toBuffer();
  };
  const pipeline = async () => {
    const visit = { id: newId(), patientId: patient.id, practitionerId: user.id, startsAt: now, kind: 'treatment' as const, status: 'booked' as const, notes: '', createdAt: now, updatedAt: now };
    await db.getRepository(Visit).insert(visit);
    const r = await ingestPhoto(deps, { visit, viewKey: 'frontal-rest', bytes, uploadedById: user.id, req: null, afterStore: false });
    if (!r.created || r.photo.width !== H || r.photo.height !== W) throw new Error('pipeline did not store an upright photo');
  };
  const render = async () => {
    await renderVariants(bytes);
  };
  const times: Record<'floor' | 'pipeline' | 'render', number[]> = { floor: [], pipeline: [], render: [] };
  const runs = mode === 'time' ? ([['floor', floor], ['pipeline', pipeline], ['render', render]] as const) : mode === 'floor' ? ([['floor', floor]] as const) : ([['pipeline', pipeline]] as const);
  // One warm-up each, then the runs (interleaved when timing).
  for (const [, fn] of runs) await fn();
  for (let i = 0; i < N; i++) {
    for (const [name, fn] of runs) {
      const start = performance.now();
      await fn();
      times[name].push(performance.now() - start);
    }
  }
  const objects = (await storage.list('patients/')).length;
  await db.destroy();
  process.stdout.write(JSON.stringify({ times, maxRssKb: process.resourceUsage().maxRSS, objects }));
}

async function parent() {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'twinframe-bench-'));
  const fixture = path.join(dir, 'camera.jpg');
  const { startS3Fake } = await import('../../server/dev-services.js');
  const s3 = await startS3Fake(path.join(dir, 'objects'), 0, BUCKET);
  try {
    await makeFixture(fixture);
    const meta = await sharp(fixture).metadata();
    const self = fileURLToPath(import.meta.url);
    const runChild = (mode: string) =>
      new Promise<{ times: Record<string, number[]>; maxRssKb: number; objects: number }>((resolve, reject) => {
        const p = spawn(process.execPath, ['--import', 'tsx', self, '--child', mode, fixture, `http://127.0.0.1:${s3.port}`], { stdio: ['ignore', 'pipe', 'inherit'] });
        let buf = '';
        p.stdout.on('data', (c: Buffer) => (buf += c.toString()));
        p.on('exit', (code) => (code === 0 ? resolve(JSON.parse(buf)) : reject(new Error(`benchmark child (${mode}) exited with ${code}`))));
      });
    const { times, objects } = await runChild('time');
    const floorRss = (await runChild('floor')).maxRssKb / 1024;
    const pipelineRss = (await runChild('pipeline')).maxRssKb / 1024;
    const f = median(times.floor);
    const p = median(times.pipeline);
    const r = median(times.render);
    const ratio = p / f;
    const fmt = (xs: number[]) => xs.map((x) => x.toFixed(0)).join(' ');
    console.log(
      [
        `ingest benchmark — ${meta.width}×${meta.height} JPEG, ${(fs.statSync(fixture).size / 1e6).toFixed(1)} MB, EXIF orientation ${meta.orientation}; ` +
          `N=${N}; sharp ${sharp.versions.sharp}, libvips ${sharp.versions.vips}; ${os.availableParallelism()} CPUs, load average ${os.loadavg()[0].toFixed(1)}; Node ${process.version}`,
        `floor    (decode + auto-orient + JPEG q92)            median ${f.toFixed(0)} ms   [${fmt(times.floor)}]`,
        `render   (one decode + 5 variants, no storage)        median ${r.toFixed(0)} ms   [${fmt(times.render)}]`,
        `pipeline (ingestPhoto: render + SHA-256 + 5 S3 puts + row) median ${p.toFixed(0)} ms   [${fmt(times.pipeline)}]`,
        `ratio pipeline/floor: ${ratio.toFixed(2)} (target ≤ 1.5) ${ratio <= 1.5 ? 'met' : 'MISSED'}`,
        `peak RSS, pipeline alone: ${pipelineRss.toFixed(0)} MB (target ≤ 600 MB) ${pipelineRss <= 600 ? 'met' : 'MISSED'}; floor alone: ${floorRss.toFixed(0)} MB`,
        `objects stored: ${objects}`,
      ].join('\n'),
    );
  } finally {
    await s3.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[2] === '--child') await child(process.argv[3] as 'time' | 'floor' | 'pipeline', process.argv[4], process.argv[5]);
else await parent();
