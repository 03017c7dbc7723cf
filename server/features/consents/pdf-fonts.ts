/**
 * Rewrites a TrueType font so every glyph record starts on a 4-byte boundary (long `loca` format).
 *
 * Why: the subsetter in @pdf-lib/fontkit 1.1.1 copies glyph records as they are and then picks the
 * short `loca` format, which stores offset / 2. Fonts built with packed glyph data (odd-length records,
 * as in the Noto Sans TTFs we ship) then get halved odd offsets, and PDF readers draw most letters
 * as nothing. Padding each record (the OpenType spec recommends 4-byte alignment) keeps every offset
 * even, so subsetting works; the glyph outlines themselves are untouched.
 */
export function alignGlyphRecords(input: Buffer): Buffer {
  const numTables = input.readUInt16BE(4);
  const tables = new Map<string, { offset: number; length: number }>();
  for (let i = 0; i < numTables; i++) {
    const rec = 12 + i * 16;
    tables.set(input.toString('latin1', rec, rec + 4), { offset: input.readUInt32BE(rec + 8), length: input.readUInt32BE(rec + 12) });
  }
  const head = tables.get('head');
  const maxp = tables.get('maxp');
  const loca = tables.get('loca');
  const glyf = tables.get('glyf');
  if (!head || !maxp || !loca || !glyf) return input; // not a TrueType-outline font: nothing to align
  const longLoca = input.readInt16BE(head.offset + 50) === 1;
  const numGlyphs = input.readUInt16BE(maxp.offset + 4);
  const offsetAt = (i: number) => (longLoca ? input.readUInt32BE(loca.offset + i * 4) : input.readUInt16BE(loca.offset + i * 2) * 2);

  const pad4 = (n: number) => (n + 3) & ~3;
  const glyphs: Buffer[] = [];
  const newLoca = Buffer.alloc((numGlyphs + 1) * 4);
  let pos = 0;
  for (let g = 0; g < numGlyphs; g++) {
    const start = offsetAt(g);
    const end = offsetAt(g + 1);
    const record = input.subarray(glyf.offset + start, glyf.offset + end);
    newLoca.writeUInt32BE(pos, g * 4);
    const padded = Buffer.alloc(pad4(record.length));
    record.copy(padded);
    glyphs.push(padded);
    pos += padded.length;
  }
  newLoca.writeUInt32BE(pos, numGlyphs * 4);

  const replaced = new Map<string, Buffer>([
    ['glyf', Buffer.concat(glyphs)],
    ['loca', newLoca],
  ]);
  const headCopy = Buffer.from(input.subarray(head.offset, head.offset + head.length));
  headCopy.writeInt16BE(1, 50);
  headCopy.writeUInt32BE(0, 8); // checkSumAdjustment, recomputed below
  replaced.set('head', headCopy);

  const tags = [...tables.keys()].sort();
  const dirLength = 12 + numTables * 16;
  const parts: Buffer[] = [];
  const records: { tag: string; checksum: number; offset: number; length: number }[] = [];
  let offset = dirLength;
  for (const tag of tags) {
    const t = tables.get(tag)!;
    const data = replaced.get(tag) ?? input.subarray(t.offset, t.offset + t.length);
    const padded = Buffer.alloc(pad4(data.length));
    data.copy(padded);
    records.push({ tag, checksum: checksum(padded), offset, length: data.length });
    parts.push(padded);
    offset += padded.length;
  }
  const dir = Buffer.alloc(dirLength);
  input.copy(dir, 0, 0, 12);
  records.forEach((r, i) => {
    const rec = 12 + i * 16;
    dir.write(r.tag, rec, 4, 'latin1');
    dir.writeUInt32BE(r.checksum, rec + 4);
    dir.writeUInt32BE(r.offset, rec + 8);
    dir.writeUInt32BE(r.length, rec + 12);
  });
  const out = Buffer.concat([dir, ...parts]);
  const headAt = records.find((r) => r.tag === 'head')!.offset;
  out.writeUInt32BE((0xb1b0afba - checksum(out)) >>> 0, headAt + 8);
  return out;
}

function checksum(b: Buffer): number {
  let sum = 0;
  for (let i = 0; i + 4 <= b.length; i += 4) sum = (sum + b.readUInt32BE(i)) >>> 0;
  return sum;
}
