import fs from 'node:fs';
import { createRequire } from 'node:module';
import bwipjs from 'bwip-js/node';
import sharp, { type Sharp } from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { configureBarcodeReader, readLabel, type LabelPixels } from '../../src/lib/barcode';

/**
 * The decoder the treatment screen runs on camera frames, here in Node on codes drawn by bwip-js (a general-purpose
 * barcode encoder implementing ISO/IEC 16022 DataMatrix and GS1-128). Only the wasm's location differs from the browser.
 */
const require = createRequire(import.meta.url);
const TODAY = new Date('2026-03-15T12:00:00Z');

beforeAll(() => {
  const wasm = fs.readFileSync(require.resolve('zxing-wasm/reader/zxing_reader.wasm'));
  configureBarcodeReader({ wasmBinary: wasm.buffer.slice(wasm.byteOffset, wasm.byteOffset + wasm.byteLength) as ArrayBuffer });
});

/** A code drawn on a label: white quiet zone, flattened to RGBA pixels as a canvas would give them. */
async function pixelsOf(png: Buffer, transform: (s: Sharp) => Sharp = (s) => s): Promise<LabelPixels> {
  const label = await sharp(png).flatten({ background: '#ffffff' }).extend({ top: 24, bottom: 24, left: 24, right: 24, background: '#ffffff' }).png().toBuffer();
  const { data, info } = await transform(sharp(label)).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
  return { data: new Uint8ClampedArray(data.buffer, data.byteOffset, data.length), width: info.width, height: info.height };
}

describe('reading a label code through the browser decode path', () => {
  it('reads a GS1 DataMatrix with GTIN, expiry (day 00), lot and serial', async () => {
    // Element string in the form of the GS1 General Specifications (section 3.4); GS1's example GTIN 09506000134352.
    const png = await bwipjs.toBuffer({ bcid: 'gs1datamatrix', text: '(01)09506000134352(17)260900(10)CW-24B-0193(21)S0001', scale: 4 });
    const read = await readLabel(await pixelsOf(png), TODAY);
    expect(read).toMatchObject({ ok: true, format: 'DataMatrix', data: { gtin: '09506000134352', expiryDate: '2026-09-30', lotNumber: 'CW-24B-0193', serialNumber: 'S0001' } });
    // The reader passes FNC1 on as GS after the variable-length lot, with the DataMatrix GS1 identifier.
    expect(read.ok && read.text).toBe(']d201095060001343521726090010CW-24B-0193\u001d21S0001');
  });

  it('reads a photo of the label: smaller, turned and softened', async () => {
    const png = await bwipjs.toBuffer({ bcid: 'gs1datamatrix', text: '(01)09501101530003(17)270131(10)HV-NM-5521', scale: 6 });
    const photo = await pixelsOf(png, (s) => s.rotate(17, { background: '#d8d4cc' }).blur(0.8).resize({ width: 260 }).extend({ top: 90, bottom: 140, left: 120, right: 60, background: '#c9c4bb' }));
    const read = await readLabel(photo, TODAY);
    expect(read).toMatchObject({ ok: true, data: { gtin: '09501101530003', expiryDate: '2027-01-31', lotNumber: 'HV-NM-5521' } });
  });

  it('reads a GS1-128 linear code', async () => {
    const png = await bwipjs.toBuffer({ bcid: 'gs1-128', text: '(01)09506000134352(17)261231(10)AB-12', scale: 3, height: 14 });
    const read = await readLabel(await pixelsOf(png), TODAY);
    expect(read).toMatchObject({ ok: true, format: 'Code128', data: { gtin: '09506000134352', expiryDate: '2026-12-31', lotNumber: 'AB-12' } });
  });

  it('says so for a code that is not GS1, for a wrong GTIN check digit and for no code at all', async () => {
    const plain = await bwipjs.toBuffer({ bcid: 'datamatrix', text: 'LOT 12345 EXP 2026', scale: 4 });
    expect(await readLabel(await pixelsOf(plain), TODAY)).toMatchObject({ ok: false, reason: 'not-gs1' });

    // bwip-js refuses to draw a GS1 code with a bad check digit (its own GS1 check), so the FNC1 is put in by hand.
    await expect(bwipjs.toBuffer({ bcid: 'gs1datamatrix', text: '(01)09506000134353(10)AB' })).rejects.toThrow(/checksum/i);
    const bad = await bwipjs.toBuffer({ bcid: 'datamatrix', text: '^FNC10109506000134353' + '10AB', parsefnc: true, scale: 4 });
    const badRead = await readLabel(await pixelsOf(bad), TODAY);
    expect(badRead).toMatchObject({ ok: false, reason: 'invalid' });
    expect(!badRead.ok && badRead.message).toMatch(/check digit/);

    const blank = await sharp({ create: { width: 320, height: 240, channels: 4, background: '#eeeeee' } }).raw().toBuffer();
    expect(await readLabel({ data: new Uint8ClampedArray(blank), width: 320, height: 240 }, TODAY)).toMatchObject({ ok: false, reason: 'no-code' });
  });
});
