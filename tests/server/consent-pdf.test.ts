import fs from 'node:fs';
import { createRequire } from 'node:module';
import zlib from 'node:zlib';
import fontkit from '@pdf-lib/fontkit';
import { PDFDict, PDFDocument, PDFName, PDFRawStream } from 'pdf-lib';
import { describe, expect, it } from 'vitest';
import { formatInZone } from '../../server/features/consents/consent-pdf.js';
import { alignGlyphRecords } from '../../server/features/consents/pdf-fonts.js';

const require = createRequire(import.meta.url);
const REGULAR = fs.readFileSync(require.resolve('@expo-google-fonts/noto-sans/400Regular/NotoSans_400Regular.ttf'));

type Glyph = { path: { commands: unknown[] } };
type Font = { numGlyphs: number; getGlyph(id: number): Glyph; glyphsForString(s: string): Glyph[] };

/** The subset font programs (FontFile2) embedded in a PDF. */
async function embeddedFonts(pdf: Uint8Array): Promise<Font[]> {
  const doc = await PDFDocument.load(pdf);
  const out: Font[] = [];
  for (const [, obj] of doc.context.enumerateIndirectObjects()) {
    if (!(obj instanceof PDFDict)) continue;
    const ref = obj.get(PDFName.of('FontFile2'));
    if (!ref) continue;
    const stream = doc.context.lookup(ref) as PDFRawStream;
    out.push(fontkit.create(Buffer.from(zlib.inflateSync(Buffer.from(stream.contents)))) as unknown as Font);
  }
  return out;
}

async function subsetPdf(font: Buffer, text: string) {
  const doc = await PDFDocument.create();
  doc.registerFontkit(fontkit);
  const f = await doc.embedFont(font, { subset: true });
  doc.addPage([400, 100]).drawText(text, { x: 10, y: 50, size: 12, font: f });
  return doc.save();
}

describe('fonts in consent PDFs', () => {
  const text = 'Zoë Łukasiewicz-Řezníčková signed';

  it('keeps every glyph outline when aligning the glyph records', () => {
    const a = fontkit.create(REGULAR) as unknown as Font;
    const b = fontkit.create(alignGlyphRecords(REGULAR)) as unknown as Font;
    expect(b.numGlyphs).toBe(a.numGlyphs);
    for (let g = 0; g < a.numGlyphs; g += 7) expect(b.getGlyph(g).path.commands).toEqual(a.getGlyph(g).path.commands);
  });

  it('embeds a subset whose glyphs all still have outlines (the unaligned font loses them)', async () => {
    const outlines = async (font: Buffer) => {
      const [sub] = await embeddedFonts(await subsetPdf(font, text));
      const counts: number[] = [];
      for (let g = 1; g < sub.numGlyphs; g++) {
        try {
          counts.push(sub.getGlyph(g).path.commands.length);
        } catch {
          counts.push(-1);
        }
      }
      return counts;
    };
    const fixed = await outlines(alignGlyphRecords(REGULAR));
    // Every glyph but the space has an outline.
    expect(fixed.filter((n) => n <= 0)).toHaveLength(1);
    const broken = await outlines(REGULAR);
    expect(broken.filter((n) => n <= 0).length).toBeGreaterThan(1);
  });

  it('prints local time with the zone name and its UTC offset', () => {
    expect(formatInZone('2026-07-01T13:05:09.000Z', 'Europe/London')).toBe('1 July 2026, 14:05:09 (Europe/London, GMT+01:00)');
    expect(formatInZone('2026-12-01T13:05:09.000Z', 'Europe/London')).toBe('1 December 2026, 13:05:09 (Europe/London, GMT+00:00)');
  });
});
