/**
 * The comparison sheet: a PDF for the patient's own record with the chosen pair (or strip) of one view, the visit
 * dates, the measurements, the patient's target ratio and the cautions of DESIGN §8.
 */
import fs from 'node:fs';
import { createRequire } from 'node:module';
import fontkit from '@pdf-lib/fontkit';
import { PDFDocument, rgb, type PDFFont, type PDFImage, type PDFPage } from 'pdf-lib';
import { formatRatio, type LipMeasurements, type MeasurementChange } from '../../media/measurements.js';
import { alignGlyphRecords } from '../consents/pdf-fonts.js';

const require = createRequire(import.meta.url);

/** Full TTFs from an npm package, subset on embedding (STACK pitfall 8): names like Łukasiewicz-Řezníčková print. */
const FONT_FILES = {
  regular: require.resolve('@expo-google-fonts/noto-sans/400Regular/NotoSans_400Regular.ttf'),
  bold: require.resolve('@expo-google-fonts/noto-sans/700Bold/NotoSans_700Bold.ttf'),
};
let fontBytes: { regular: Buffer; bold: Buffer } | null = null;
const loadFonts = () => (fontBytes ??= { regular: alignGlyphRecords(fs.readFileSync(FONT_FILES.regular)), bold: alignGlyphRecords(fs.readFileSync(FONT_FILES.bold)) });

/** Shown on every sheet (DESIGN §8). */
export const SHEET_CAUTION =
  'Results vary from person to person and change over time. The measurements are taken from landmarks on the photos and are guides for discussion, not treatment targets. Treatment decisions rest with a suitably qualified, licensed practitioner.';

export interface SheetPhoto {
  visitStartsAt: string;
  visitKind: string;
  /** A JPEG of the photo (the aligned photo when it was compared aligned). */
  jpeg: Buffer;
  width: number;
  height: number;
  aligned: boolean;
  measurements: LipMeasurements | null;
}

export interface SheetInput {
  clinicName: string;
  timeZone: string;
  patient: { firstName: string; lastName: string; code: string };
  viewLabel: string;
  layout: 'pair' | 'strip';
  /** Pair: [baseline, follow-up]. Strip: oldest first. */
  photos: SheetPhoto[];
  /** Pair only: the follow-up's change against the baseline. */
  change: MeasurementChange | null;
  target: { value: number; label: string } | null;
  /** Plain reasons why the photos are not directly comparable; empty when they are. */
  notComparable: string[];
  generatedAt: string;
}

const A4 = { width: 595.28, height: 841.89 };
const M = 48;
const INK = rgb(0.11, 0.11, 0.1);
const MUTED = rgb(0.37, 0.35, 0.31);
const LINE = rgb(0.84, 0.81, 0.76);
/** The app's photo surround (#6e6e6e): neutral grey, no tint on skin. */
const SURROUND = rgb(110 / 255, 110 / 255, 110 / 255);
const WARN_BG = rgb(0.97, 0.92, 0.82);
const WARN_INK = rgb(0.43, 0.27, 0.03);

export const sheetDate = (iso: string, timeZone: string) => new Intl.DateTimeFormat('en-GB', { timeZone, day: 'numeric', month: 'long', year: 'numeric' }).format(new Date(iso));

const KIND: Record<string, string> = { consultation: 'Consultation', treatment: 'Treatment', review: 'Review', 'follow-up': 'Follow-up' };

function wrap(text: string, font: PDFFont, size: number, maxW: number): string[] {
  const out: string[] = [];
  let line = '';
  for (const word of text.split(/\s+/)) {
    const next = line ? `${line} ${word}` : word;
    if (font.widthOfTextAtSize(next, size) > maxW && line) {
      out.push(line);
      line = word;
    } else line = next;
  }
  if (line) out.push(line);
  return out;
}

const mm = (v: number | null | undefined, d = 1) => (v === null || v === undefined ? '—' : `${v.toFixed(d)} mm`);
const mm2 = (v: number | null | undefined) => (v === null || v === undefined ? '—' : `${Math.round(v)} mm²`);
const signed = (v: number, d: number, unit: string) => `${v > 0 ? '+' : v < 0 ? '−' : '±'}${Math.abs(v).toFixed(d)}${unit}`;
const pct = (p: number | null) => (p === null ? '' : ` (${p > 0 ? '+' : p < 0 ? '−' : '±'}${Math.abs(p).toFixed(0)} %)`);

/** Lays out the sheet (photos on the neutral surround, no coloured frame); unsaved, for `signPdf` to save and sign. */
export async function renderComparisonSheet(input: SheetInput): Promise<PDFDocument> {
  const doc = await PDFDocument.create();
  doc.registerFontkit(fontkit);
  const bytes = loadFonts();
  const regular = await doc.embedFont(bytes.regular, { subset: true });
  const bold = await doc.embedFont(bytes.bold, { subset: true });
  const name = `${input.patient.firstName} ${input.patient.lastName}`;
  doc.setTitle(`Comparison sheet: ${input.viewLabel} for ${name}`);
  doc.setAuthor(input.clinicName);
  doc.setCreator('Twinframe');
  doc.setProducer('Twinframe');
  doc.setCreationDate(new Date(input.generatedAt));

  const images: PDFImage[] = [];
  for (const p of input.photos) images.push(await doc.embedJpg(p.jpeg));

  let page: PDFPage = doc.addPage([A4.width, A4.height]);
  let y = A4.height - M;
  const W = A4.width - 2 * M;
  const text = (s: string, x: number, size: number, font = regular, color = INK) => page.drawText(s, { x, y, size, font, color });
  const paragraph = (s: string, size: number, font = regular, color = INK, x = M, maxW = W) => {
    for (const line of wrap(s, font, size, maxW)) {
      ensure(size * 1.45);
      y -= size * 1.45;
      page.drawText(line, { x, y, size, font, color });
    }
  };
  const ensure = (h: number) => {
    if (y - h < M + 24) {
      page = doc.addPage([A4.width, A4.height]);
      y = A4.height - M;
    }
  };

  // Heading
  y -= 10;
  text(input.clinicName.toUpperCase(), M, 9, bold, MUTED);
  y -= 26;
  text('Comparison sheet', M, 22, bold);
  y -= 20;
  text(`${input.viewLabel} · ${name} (${input.patient.code})`, M, 12, regular);
  y -= 16;
  const first = input.photos[0], last = input.photos[input.photos.length - 1];
  text(
    input.layout === 'pair'
      ? `Baseline ${sheetDate(first.visitStartsAt, input.timeZone)}, follow-up ${sheetDate(last.visitStartsAt, input.timeZone)}`
      : `${input.photos.length} visits, ${sheetDate(first.visitStartsAt, input.timeZone)} to ${sheetDate(last.visitStartsAt, input.timeZone)}`,
    M,
    10,
    regular,
    MUTED,
  );
  y -= 14;
  page.drawLine({ start: { x: M, y }, end: { x: A4.width - M, y }, thickness: 0.6, color: LINE });

  // Photos on the neutral surround
  const cols = input.layout === 'pair' ? 2 : input.photos.length <= 4 ? 2 : input.photos.length <= 9 ? 3 : 4;
  const gap = 10;
  const cellW = (W - gap * (cols - 1)) / cols;
  const aspect = Math.max(...input.photos.map((p) => p.height / p.width));
  const cellH = Math.min(cellW * aspect, input.layout === 'pair' ? 330 : 260);
  input.photos.forEach((p, i) => {
    const col = i % cols;
    if (col === 0) {
      ensure(cellH + 34);
      y -= 12 + cellH;
    }
    const x = M + col * (cellW + gap);
    page.drawRectangle({ x, y, width: cellW, height: cellH, color: SURROUND });
    const s = Math.min(cellW / p.width, cellH / p.height);
    const w = p.width * s, h = p.height * s;
    page.drawImage(images[i], { x: x + (cellW - w) / 2, y: y + (cellH - h) / 2, width: w, height: h });
    const label = input.layout === 'pair' ? (i === 0 ? 'Baseline' : 'Follow-up') : `${i + 1}`;
    page.drawText(`${label} · ${sheetDate(p.visitStartsAt, input.timeZone)}`, { x, y: y - 13, size: 9.5, font: bold, color: INK });
    page.drawText(`${KIND[p.visitKind] ?? p.visitKind}${p.aligned ? ' · aligned to the standard frame' : ' · as taken'}`, { x, y: y - 25, size: 8, font: regular, color: MUTED });
    if (col === cols - 1 || i === input.photos.length - 1) y -= 30;
  });

  // Not comparable: said plainly, before any number
  if (input.notComparable.length) {
    y -= 8;
    const lines = input.notComparable.flatMap((r) => wrap(`• ${r}`, regular, 9, W - 20));
    const h = 24 + lines.length * 13;
    ensure(h + 6);
    y -= h;
    page.drawRectangle({ x: M, y, width: W, height: h, color: WARN_BG });
    let ly = y + h - 16;
    page.drawText('Please note: these photos are not directly comparable', { x: M + 10, y: ly, size: 10, font: bold, color: WARN_INK });
    for (const l of lines) {
      ly -= 13;
      page.drawText(l, { x: M + 10, y: ly, size: 9, font: regular, color: WARN_INK });
    }
  }

  // Measurements
  const measured = input.photos.filter((p) => p.measurements);
  y -= 18;
  ensure(40);
  text('Measurements', M, 13, bold);
  if (!measured.length) {
    paragraph('No lip measurements are taken on this view, or the landmarks needed for them are not placed.', 9.5, regular, MUTED);
  } else {
    const approx = measured.some((p) => p.measurements!.scale?.approximate);
    const rows: { label: string; value: (m: LipMeasurements) => string }[] = [
      { label: 'Upper : lower lip', value: (m) => formatRatio(m.ratio) },
      { label: 'Upper lip height', value: (m) => (m.upperHeight.mm !== null ? mm(m.upperHeight.mm) : `${m.upperHeight.rel.toFixed(3)} ${m.unit}`) },
      { label: 'Lower lip height', value: (m) => (m.lowerHeight.mm !== null ? mm(m.lowerHeight.mm) : `${m.lowerHeight.rel.toFixed(3)} ${m.unit}`) },
      { label: 'Mouth width', value: (m) => (m.mouthWidth.mm !== null ? mm(m.mouthWidth.mm) : `${m.mouthWidth.rel.toFixed(3)} ${m.unit}`) },
      { label: 'Total vermilion area', value: (m) => (m.totalArea.mm2 !== null ? mm2(m.totalArea.mm2) : `${m.totalArea.rel.toFixed(4)} ${m.unit}²`) },
    ];
    const shown = input.layout === 'pair' ? input.photos : measured;
    const firstCol = 130;
    const colW = Math.min(110, (W - firstCol - (input.layout === 'pair' ? 120 : 0)) / shown.length);
    y -= 8;
    ensure(20 + rows.length * 16);
    y -= 14;
    shown.forEach((p, i) => page.drawText(input.layout === 'pair' ? (i === 0 ? 'Baseline' : 'Follow-up') : sheetDate(p.visitStartsAt, input.timeZone), { x: M + firstCol + i * colW, y, size: 8.5, font: bold, color: MUTED }));
    if (input.layout === 'pair') page.drawText('Change', { x: M + firstCol + 2 * colW, y, size: 8.5, font: bold, color: MUTED });
    const c = input.change;
    const changeText: Record<string, string> = c
      ? {
          'Upper : lower lip': c.ratio ? signed(c.ratio.delta, 2, '') : '—',
          'Upper lip height': c.mm ? signed(c.mm.upperHeight.delta, 1, ' mm') + pct(c.mm.upperHeight.pct) : c.upperHeight ? pct(c.upperHeight.pct).trim() : '—',
          'Lower lip height': c.mm ? signed(c.mm.lowerHeight.delta, 1, ' mm') + pct(c.mm.lowerHeight.pct) : c.lowerHeight ? pct(c.lowerHeight.pct).trim() : '—',
          'Mouth width': c.mm ? signed(c.mm.mouthWidth.delta, 1, ' mm') + pct(c.mm.mouthWidth.pct) : c.mouthWidth ? pct(c.mouthWidth.pct).trim() : '—',
          'Total vermilion area': c.mm ? signed(c.mm.totalArea.delta, 0, ' mm²') + pct(c.mm.totalArea.pct) : c.totalArea ? pct(c.totalArea.pct).trim() : '—',
        }
      : {};
    for (const r of rows) {
      y -= 16;
      page.drawLine({ start: { x: M, y: y + 12 }, end: { x: A4.width - M, y: y + 12 }, thickness: 0.4, color: LINE });
      page.drawText(r.label, { x: M, y, size: 9.5, font: regular, color: INK });
      shown.forEach((p, i) => page.drawText(p.measurements ? r.value(p.measurements) : '—', { x: M + firstCol + i * colW, y, size: 9.5, font: regular, color: INK }));
      if (input.layout === 'pair') page.drawText(changeText[r.label] ?? '—', { x: M + firstCol + 2 * colW, y, size: 9.5, font: bold, color: INK });
    }
    y -= 4;
    if (approx) paragraph('mm values are approximate: the scale comes from an average adult eye distance (about 63 mm), not from a ruler in the photo.', 8, regular, MUTED);
  }

  y -= 10;
  ensure(30);
  paragraph(
    input.target
      ? `Your chosen target for the upper : lower lip ratio: ${formatRatio(input.target.value)} (${input.target.label}).`
      : 'No target ratio has been chosen for the upper : lower lip ratio.',
    10,
    bold,
  );
  y -= 6;
  paragraph(SHEET_CAUTION, 9, regular, MUTED);

  // Footer on every page
  const pages = doc.getPages();
  pages.forEach((pg, i) => {
    const footer = `Prepared for ${name}'s own record by ${input.clinicName} on ${sheetDate(input.generatedAt, input.timeZone)}. Page ${i + 1} of ${pages.length}.`;
    pg.drawText(footer, { x: M, y: M - 16, size: 7.5, font: regular, color: MUTED });
  });
  return doc;
}
