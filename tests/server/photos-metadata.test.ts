import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { converter } from 'culori';
import exifr from 'exifr';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { bucketKeys, exiftoolRead, exiftoolWrite, patientWithVisit, photoLikeJpeg, upload } from '../helpers/photos.js';

/** A Display P3 ICC profile (as libvips ships it), pulled out of a tagged file with ExifTool. */
async function displayP3Profile(dir: string): Promise<string> {
  const tagged = path.join(dir, 'p3-source.jpg');
  await sharp({ create: { width: 8, height: 8, channels: 3, background: '#808080' } }).withIccProfile('p3').jpeg().toFile(tagged);
  const { stdout } = await promisify(execFile)('exiftool', ['-b', '-ICC_Profile', tagged], { encoding: 'buffer' });
  const file = path.join(dir, 'display-p3.icc');
  fs.writeFileSync(file, stdout);
  return file;
}

/**
 * Identifying metadata to strip (Exif 2.3x tag list): the GPS IFD (0x8825) and its tags, CameraOwnerName (0xA430),
 * BodySerialNumber (0xA431), LensSerialNumber (0xA435), Artist (0x013B), Copyright, ImageUniqueID, UserComment,
 * MakerNote (0x927C), the IFD1 thumbnail, and XMP/IPTC location and creator fields. ExifTool names some of these
 * differently: OwnerName = CameraOwnerName, SerialNumber = BodySerialNumber.
 */
const IDENTIFYING_ARGS = [
  '-GPSLatitude=51.5072',
  '-GPSLatitudeRef=N',
  '-GPSLongitude=0.1276',
  '-GPSLongitudeRef=W',
  '-GPSAltitude=35',
  '-Make=Examplecam',
  '-Model=Examplecam Q7',
  '-SerialNumber=BODY-00912',
  '-OwnerName=Clinic Camera Owner',
  '-LensSerialNumber=LENS-4471',
  '-Artist=Invented Photographer',
  '-Copyright=Invented Clinic Ltd',
  '-ImageUniqueID=f00dfacecafe4242',
  '-UserComment=patient room 2',
  '-MakerNotes=vendor-private-block',
  '-XMP-dc:Creator=Invented Photographer',
  '-XMP-photoshop:City=Exampletown',
  '-XMP-exif:GPSLatitude=51.5072',
  '-IPTC:By-line=Invented Photographer',
  '-IPTC:City=Exampletown',
  '-IPTC:Country-PrimaryLocationName=Exampleland',
  '-DateTimeOriginal=2025:03:14 10:15:00',
  '-OffsetTimeOriginal=+01:00',
];
/** Names (ExifTool "Group:Tag" keys, exifr keys) that must never reach a stored file. */
const FORBIDDEN = /GPS|Serial|Owner|Artist|Copyright|ImageUniqueID|UserComment|MakerNote|Make|Model|Creator|City|By-?line|Country|Thumbnail|ICC|DateTime|latitude|longitude/i;
/** Groups a bare image file may show in ExifTool: its own and the file's structure, nothing written by a camera. */
const ALLOWED_GROUPS = new Set(['ExifTool', 'System', 'File', 'JFIF', 'Composite', 'RIFF']);

let t: TestApp;
let practitioner: Client;
let practitionerId: string;
let dir: string;
beforeAll(async () => {
  t = await makeTestApp();
  const s = await signedIn(t, 'practitioner');
  practitioner = s.client;
  practitionerId = s.user.id;
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tf-meta-'));
});
afterAll(async () => {
  fs.rmSync(dir, { recursive: true, force: true });
  await t.close();
});

describe('identifying metadata is stripped from every stored variant', () => {
  it('ExifTool and exifr find none of the tagged fields in any stored object', async () => {
    const thumbFile = path.join(dir, 'ifd1-thumb.jpg');
    await sharp({ create: { width: 160, height: 120, channels: 3, background: '#336699' } }).jpeg().toFile(thumbFile);
    const icc = await displayP3Profile(dir);
    const fixture = await exiftoolWrite(await photoLikeJpeg(1200, 900, 3), [...IDENTIFYING_ARGS, `-ThumbnailImage<=${thumbFile}`, `-ICC_Profile<=${icc}`]);

    // Before ingest: the fixture carries every one of them (so the check below can fail).
    const before = await exiftoolRead(fixture);
    for (const key of [
      'GPS:GPSLatitude', 'IFD0:Make', 'IFD0:Model', 'ExifIFD:SerialNumber', 'ExifIFD:OwnerName', 'ExifIFD:LensSerialNumber',
      'IFD0:Artist', 'IFD0:Copyright', 'ExifIFD:ImageUniqueID', 'ExifIFD:UserComment', 'ExifIFD:MakerNoteUnknownText',
      'IFD1:ThumbnailImage', 'XMP-dc:Creator', 'XMP-photoshop:City', 'IPTC:By-line', 'IPTC:City', 'ICC-header:ProfileCMMType',
    ]) {
      expect(before[key], key).toBeDefined();
    }
    const exifrBefore = await exifr.parse(fixture, { tiff: true, ifd1: true, exif: true, gps: true, xmp: true, iptc: true, icc: true, makerNote: true, userComment: true });
    for (const key of ['latitude', 'Make', 'SerialNumber', 'OwnerName', 'Artist', 'makerNote', 'userComment', 'creator', 'Byline']) {
      expect(exifrBefore[key], `exifr ${key}`).toBeDefined();
    }

    const before1 = await bucketKeys(t);
    const { visit } = await patientWithVisit(t, practitioner, practitionerId);
    const res = await upload(practitioner, visit.id, fixture, { view: 'frontal-rest' });
    expect(res.status).toBe(201);
    // The capture time survives as a database field, converted to UTC with the EXIF offset.
    expect(res.body.capturedAt).toBe('2025-03-14T09:15:00.000Z');
    expect(res.body.captureTimeSource).toBe('exif');

    const stored = (await bucketKeys(t)).filter((k) => !before1.includes(k));
    expect(stored).toHaveLength(5);
    for (const key of stored) {
      const bytes = await t.deps.storage.get(key);
      const ext = key.endsWith('.webp') ? 'webp' : 'jpg';
      const tags = await exiftoolRead(bytes, ext);
      const groups = new Set(Object.keys(tags).filter((k) => k.includes(':')).map((k) => k.split(':')[0]));
      expect([...groups].filter((g) => !ALLOWED_GROUPS.has(g)), key).toEqual([]);
      expect(Object.keys(tags).filter((k) => FORBIDDEN.test(k)), key).toEqual([]);
      expect(JSON.stringify(tags)).not.toMatch(/Invented|Exampletown|Examplecam|BODY-00912|LENS-4471|f00dfacecafe|patient room/);
      // exifr cannot read WebP (ExifTool above covers those); every JPEG is read with every segment turned on.
      if (ext === 'jpg') {
        const found = await exifr.parse(bytes, { tiff: true, ifd1: true, exif: true, gps: true, xmp: true, iptc: true, icc: true, makerNote: true, userComment: true, jfif: false });
        expect(Object.keys(found ?? {}), key).toEqual([]);
      }
    }
  });

  it('converts colour from an embedded Display P3 profile to sRGB and keeps no profile', async () => {
    // The numbers (200, 100, 50) mean a different colour in Display P3 than in sRGB. Expected sRGB values come from
    // culori's display-p3 → rgb conversion (CSS Color 4 definitions of both spaces), not from the pipeline itself.
    const icc = await displayP3Profile(dir);
    const plain = await sharp({ create: { width: 96, height: 96, channels: 3, background: { r: 200, g: 100, b: 50 } } }).jpeg({ quality: 100 }).toBuffer();
    const fixture = await exiftoolWrite(plain, [`-ICC_Profile<=${icc}`]);
    const { visit } = await patientWithVisit(t, practitioner, practitionerId);
    const res = await upload(practitioner, visit.id, fixture, { view: 'lips-rest' });
    expect(res.status).toBe(201);

    const master = await practitioner.get(`/api/photos/${res.body.id}/file?variant=master`).buffer(true);
    expect((await sharp(master.body).metadata()).icc).toBeUndefined();
    const { data } = await sharp(master.body).raw().toBuffer({ resolveWithObject: true });
    const want = converter('rgb')({ mode: 'p3', r: 200 / 255, g: 100 / 255, b: 50 / 255 });
    const expected = [want.r, want.g, want.b].map((v) => v * 255);
    const got = [data[0], data[1], data[2]];
    got.forEach((v, i) => expect(Math.abs(v - expected[i]), `channel ${i}: ${got} vs ${expected}`).toBeLessThanOrEqual(3));
    // And it did change: the P3 numbers were not copied through as if they were sRGB.
    expect(Math.abs(got[0] - 200) + Math.abs(got[2] - 50)).toBeGreaterThan(15);
  });
});

describe('capture time', () => {
  it('reads EXIF time without an offset in the clinic time zone, and falls back to the upload time', async () => {
    const { visit } = await patientWithVisit(t, practitioner, practitionerId);
    // 1 July is in British Summer Time (UTC+1) in the default clinic zone Europe/London.
    const summer = await exiftoolWrite(await photoLikeJpeg(320, 240, 1), ['-DateTimeOriginal=2025:07:01 10:00:00']);
    const a = await upload(practitioner, visit.id, summer, { view: 'frontal-rest' });
    expect(a.status).toBe(201);
    expect(a.body.capturedAt).toBe('2025-07-01T09:00:00.000Z');

    const start = Date.now();
    const none = await photoLikeJpeg(320, 240, 2);
    const b = await upload(practitioner, visit.id, none, { view: 'frontal-smile' });
    expect(b.status).toBe(201);
    expect(b.body.captureTimeSource).toBe('upload');
    expect(Date.parse(b.body.capturedAt)).toBeGreaterThanOrEqual(start - 1000);
    expect(b.body.capturedAt).toBe(b.body.uploadedAt);
  });
});
