import { prepareZXingModule, readBarcodes, type ReaderOptions } from 'zxing-wasm/reader';
import { Gs1Error, parseGs1, type Gs1Data } from '../../server/lib/gs1';

/** Pixels as a canvas gives them (RGBA); in Node, any object of this shape. */
export interface LabelPixels {
  data: Uint8ClampedArray;
  width: number;
  height: number;
}

export type LabelRead =
  | { ok: true; data: Gs1Data; text: string; format: string }
  | { ok: false; reason: 'no-code' | 'not-gs1' | 'invalid'; message: string; text?: string };

/**
 * GS1 DataMatrix and GS1-128 are what syringe and vial labels carry; QR and plain barcodes are read too, so that a
 * code that is not GS1 can say so instead of "nothing found". Plain text keeps FNC1 as GS and gives the symbology
 * identifier (]d2, ]C1) the parser checks.
 */
const READER: ReaderOptions = {
  formats: ['DataMatrix', 'Code128', 'DataBar', 'DataBarExp', 'EAN13', 'UPCA', 'QRCode'],
  textMode: 'Plain',
  tryHarder: true,
  maxNumberOfSymbols: 4,
};

/**
 * Where the reader's wasm comes from: the browser passes `locateFile` to the app's own static copy (the CSP allows
 * no CDN); Node tests pass `wasmBinary` read from the package. Call once before the first read.
 */
export function configureBarcodeReader(overrides: { locateFile: (path: string, prefix: string) => string } | { wasmBinary: ArrayBuffer }): void {
  prepareZXingModule({ overrides });
}

/**
 * Reads the codes in one image and parses the first GS1 one. A frame with no code, a code that is not GS1 and a GS1
 * code with a wrong GTIN check digit or a bad date each come back as `ok: false` with a message for the screen.
 */
export async function readLabel(pixels: LabelPixels, today: Date = new Date()): Promise<LabelRead> {
  const results = (await readBarcodes(pixels as ImageData, READER)).filter((r) => r.isValid);
  if (!results.length) return { ok: false, reason: 'no-code', message: 'No code found. Hold the label flat, fill the frame with the code and keep it still.' };
  // A DataMatrix before a linear code on the same label: it usually carries every field.
  const ordered = [...results].sort((a, b) => Number(b.contentType === 'GS1') - Number(a.contentType === 'GS1') || Number(b.format === 'DataMatrix') - Number(a.format === 'DataMatrix'));
  let firstError: LabelRead | null = null;
  for (const r of ordered) {
    const text = `${r.symbologyIdentifier}${r.text}`;
    try {
      return { ok: true, data: parseGs1(text, today), text, format: r.format };
    } catch (e) {
      if (!(e instanceof Gs1Error)) throw e;
      firstError ??= e.code === 'NOT_GS1'
        ? { ok: false, reason: 'not-gs1', message: 'This code is not a GS1 label code (no GTIN, lot or expiry in it). Enter the details by hand.', text }
        : { ok: false, reason: 'invalid', message: `The code was read but is not valid: ${e.message}`, text };
    }
  }
  return firstError!;
}
