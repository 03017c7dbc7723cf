import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import bwipjs from 'bwip-js/node';
import sharp from 'sharp';

/**
 * A video file for Chromium's fake camera (`--use-file-for-fake-video-capture`): a label with a GS1 DataMatrix drawn
 * by bwip-js on a grey bench, as YUV4MPEG2 (4:2:0), the uncompressed format Chromium reads. Converted from RGB with
 * the BT.601 studio-range coefficients (ITU-R BT.601).
 */
export async function writeLabelVideo(elementString: string, opts: { width?: number; height?: number; frames?: number } = {}): Promise<string> {
  const width = opts.width ?? 640;
  const height = opts.height ?? 480;
  const frames = opts.frames ?? 10;
  const code = await bwipjs.toBuffer({ bcid: 'gs1datamatrix', text: elementString, scale: 6, paddingwidth: 4, paddingheight: 4, backgroundcolor: 'FFFFFF' });
  const label = await sharp(code).resize({ height: Math.round(height * 0.5) }).png().toBuffer();
  const meta = await sharp(label).metadata();
  const { data } = await sharp({ create: { width, height, channels: 3, background: '#b9b4aa' } })
    .composite([{ input: label, left: Math.round((width - meta.width!) / 2), top: Math.round((height - meta.height!) / 2) }])
    .removeAlpha()
    .raw()
    .toBuffer({ resolveWithObject: true });
  const y = Buffer.alloc(width * height);
  const u = Buffer.alloc((width / 2) * (height / 2));
  const v = Buffer.alloc((width / 2) * (height / 2));
  for (let j = 0; j < height; j++) {
    for (let i = 0; i < width; i++) {
      const o = (j * width + i) * 3;
      const [r, g, b] = [data[o], data[o + 1], data[o + 2]];
      y[j * width + i] = Math.round(16 + 0.257 * r + 0.504 * g + 0.098 * b);
      if (j % 2 === 0 && i % 2 === 0) {
        const c = (j / 2) * (width / 2) + i / 2;
        u[c] = Math.round(128 - 0.148 * r - 0.291 * g + 0.439 * b);
        v[c] = Math.round(128 + 0.439 * r - 0.368 * g - 0.071 * b);
      }
    }
  }
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'twinframe-camera-')), 'label.y4m');
  const out = fs.createWriteStream(file);
  out.write(`YUV4MPEG2 W${width} H${height} F10:1 Ip A1:1 C420jpeg\n`);
  for (let f = 0; f < frames; f++) {
    out.write('FRAME\n');
    out.write(y);
    out.write(u);
    out.write(v);
  }
  await new Promise<void>((resolve, reject) => out.end((err?: Error | null) => (err ? reject(err) : resolve())));
  return file;
}
