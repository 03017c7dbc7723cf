import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import sharp from 'sharp';
import { Photo } from '../../server/entities/photo.js';
import { createPatient, type Client, type TestApp } from './app.js';

const run = promisify(execFile);

/** Runs ExifTool (Debian libimage-exiftool-perl) on a copy of `bytes` with `args`, returns the rewritten bytes. */
export async function exiftoolWrite(bytes: Buffer, args: string[], ext = 'jpg'): Promise<Buffer> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tf-exif-'));
  const file = path.join(dir, `in.${ext}`);
  try {
    fs.writeFileSync(file, bytes);
    await run('exiftool', ['-overwrite_original', '-q', ...args, file]);
    return fs.readFileSync(file);
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

/** Every tag ExifTool finds, as `{ "Group1:TagName": value }` (all groups, duplicates and unknown tags included). */
export async function exiftoolRead(bytes: Buffer, ext = 'jpg'): Promise<Record<string, unknown>> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tf-exif-'));
  const file = path.join(dir, `in.${ext}`);
  try {
    fs.writeFileSync(file, bytes);
    const { stdout } = await run('exiftool', ['-j', '-a', '-u', '-G1', '-n', file], { maxBuffer: 16 * 1024 * 1024 });
    return (JSON.parse(stdout) as Record<string, unknown>[])[0];
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

/** A camera-like JPEG: smooth colour fields plus sensor-like noise, so it compresses like a photo. */
export async function photoLikeJpeg(width: number, height: number, seed = 0): Promise<Buffer> {
  const hue = (seed * 47) % 360;
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}">
    <defs><linearGradient id="g" x1="0" y1="0" x2="1" y2="1">
      <stop offset="0" stop-color="hsl(${hue},40%,70%)"/><stop offset="1" stop-color="hsl(${(hue + 60) % 360},40%,35%)"/>
    </linearGradient></defs>
    <rect width="100%" height="100%" fill="url(#g)"/>
    <ellipse cx="${width / 2}" cy="${height / 2}" rx="${width / 4}" ry="${height / 3}" fill="hsl(20,45%,${55 + (seed % 5) * 3}%)"/>
  </svg>`;
  const base = await sharp(Buffer.from(svg)).removeAlpha().raw().toBuffer();
  const noise = await sharp({ create: { width, height, channels: 3, background: '#000', noise: { type: 'gaussian', mean: 0, sigma: 5 } } }).raw().toBuffer();
  return sharp(base, { raw: { width, height, channels: 3 } })
    .composite([{ input: noise, raw: { width, height, channels: 3 }, blend: 'add' }])
    .jpeg({ quality: 90 })
    .toBuffer();
}

export async function bucketKeys(t: TestApp): Promise<string[]> {
  return (await t.deps.storage.list('')).sort();
}

export async function photoRows(t: TestApp): Promise<Photo[]> {
  return t.db.getRepository(Photo).find({ order: { uploadedAt: 'ASC' } });
}

/** A patient with one booked visit, made through the API by the given clinician. */
export async function patientWithVisit(t: TestApp, client: Client, practitionerId: string) {
  const patient = await createPatient(t.db);
  const res = await client
    .post(`/api/patients/${patient.id}/visits`)
    .send({ startsAt: new Date().toISOString(), kind: 'treatment', practitionerId });
  if (res.status !== 201) throw new Error(`visit not created: ${res.status} ${JSON.stringify(res.body)}`);
  return { patient, visit: res.body as { id: string; patientId: string; shotListId: string } };
}

/** Uploads one file as the multipart form the capture screen sends. */
export function upload(client: Client, visitId: string, bytes: Buffer, fields: Record<string, string>, filename = 'photo.jpg') {
  let req = client.post(`/api/visits/${visitId}/photos`);
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
  return req.attach('photo', bytes, { filename, contentType: 'image/jpeg' });
}
