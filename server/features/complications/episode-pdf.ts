/**
 * The complication summary: a PDF for an insurer or regulator with the treatment (products, lots, zones), the
 * episode's onset, signs, timed actions, follow-ups and outcome, photo pairs against the baseline, and the clinic's
 * protocol pointer, signed by the clinic like its consents. It is a record of what happened; it gives no treatment
 * advice and no doses (DESIGN §8).
 */
import fs from 'node:fs';
import { createRequire } from 'node:module';
import fontkit from '@pdf-lib/fontkit';
import { PDFDocument, rgb, type PDFFont, type PDFPage } from 'pdf-lib';
import sharp from 'sharp';
import { In } from 'typeorm';
import type { Deps } from '../../deps.js';
import type { ComplicationEpisode } from '../../entities/complication.js';
import { Patient } from '../../entities/patient.js';
import { Photo } from '../../entities/photo.js';
import { Treatment } from '../../entities/treatment.js';
import { nowIso } from '../../lib/time.js';
import { sha256Hex } from '../consents/hash.js';
import { alignGlyphRecords } from '../consents/pdf-fonts.js';
import { signingIdentity, signPdf } from '../../signing/pdf-signing.js';
import { getSettings } from '../settings/settings.service.js';
import { ZONE_LABELS } from '../treatments/treatments.schemas.js';
import { ACTION_LABELS, OUTCOME_LABELS, SIGN_LABELS } from './complications.schemas.js';
import { episodeView, type PhotoPair } from './complications.service.js';

const require = createRequire(import.meta.url);
const FONT_FILES = {
  regular: require.resolve('@expo-google-fonts/noto-sans/400Regular/NotoSans_400Regular.ttf'),
  bold: require.resolve('@expo-google-fonts/noto-sans/700Bold/NotoSans_700Bold.ttf'),
};
let fontBytes: { regular: Buffer; bold: Buffer } | null = null;
const loadFonts = () => (fontBytes ??= { regular: alignGlyphRecords(fs.readFileSync(FONT_FILES.regular)), bold: alignGlyphRecords(fs.readFileSync(FONT_FILES.bold)) });

export const EPISODE_CAUTION =
  'This document records what was observed and done. It is not treatment advice and states no doses for emergencies. Complications are managed by a suitably qualified, licensed practitioner under the clinic’s protocol, local regulation and published guidance.';

const A4 = { width: 595.28, height: 841.89 };
const M = 48;
const INK = rgb(0.11, 0.11, 0.1);
const MUTED = rgb(0.37, 0.35, 0.31);
const LINE = rgb(0.84, 0.81, 0.76);
const SURROUND = rgb(110 / 255, 110 / 255, 110 / 255);
const PHOTO_PAIRS = 3;

function wrap(text: string, font: PDFFont, size: number, maxW: number): string[] {
  const out: string[] = [];
  for (const para of text.split('\n')) {
    let line = '';
    for (const word of para.split(/\s+/)) {
      const next = line ? `${line} ${word}` : word;
      if (font.widthOfTextAtSize(next, size) > maxW && line) {
        out.push(line);
        line = word;
      } else line = next;
    }
    out.push(line);
  }
  return out;
}

const fmt = (n: number) => String(Math.round(n * 100) / 100);

export async function buildEpisodePdf(deps: Deps, e: ComplicationEpisode): Promise<{ bytes: Buffer; sha256: string; fileName: string }> {
  const { db } = deps;
  const view = await episodeView(db, e);
  const settings = await getSettings(db, deps.config);
  const patient = await db.getRepository(Patient).findOneByOrFail({ id: e.patientId });
  const treatment = await db.getRepository(Treatment).findOneOrFail({
    where: { id: e.treatmentId },
    relations: { lines: { doses: true }, practitioner: true },
    order: { lines: { position: 'ASC', doses: { zone: 'ASC' } } },
  });
  const when = (iso: string) => new Intl.DateTimeFormat('en-GB', { timeZone: settings.timeZone, day: 'numeric', month: 'long', year: 'numeric', hour: '2-digit', minute: '2-digit' }).format(new Date(iso));
  const generatedAt = nowIso();

  const doc = await PDFDocument.create();
  doc.registerFontkit(fontkit);
  const bytes = loadFonts();
  const regular = await doc.embedFont(bytes.regular, { subset: true });
  const bold = await doc.embedFont(bytes.bold, { subset: true });
  const name = `${patient.firstName} ${patient.lastName}`;
  doc.setTitle(`Complication record: ${name}, ${when(e.onsetAt)}`);
  doc.setAuthor(settings.clinicName);
  doc.setCreator('Twinframe');
  doc.setProducer('Twinframe');
  doc.setCreationDate(new Date(generatedAt));

  let page: PDFPage = doc.addPage([A4.width, A4.height]);
  let y = A4.height - M;
  const W = A4.width - 2 * M;
  const ensure = (h: number) => {
    if (y - h < M + 30) {
      page = doc.addPage([A4.width, A4.height]);
      y = A4.height - M;
    }
  };
  const para = (s: string, size = 10, font = regular, color = INK, indent = 0) => {
    for (const line of wrap(s, font, size, W - indent)) {
      ensure(size * 1.5);
      y -= size * 1.5;
      page.drawText(line, { x: M + indent, y, size, font, color });
    }
  };
  const heading = (s: string) => {
    ensure(40);
    y -= 18;
    page.drawText(s, { x: M, y, size: 13, font: bold, color: INK });
    y -= 5;
    page.drawLine({ start: { x: M, y }, end: { x: A4.width - M, y }, thickness: 0.5, color: LINE });
  };

  y -= 10;
  page.drawText(settings.clinicName.toUpperCase(), { x: M, y, size: 9, font: bold, color: MUTED });
  y -= 26;
  page.drawText('Complication record', { x: M, y, size: 22, font: bold, color: INK });
  para(`${name} (${patient.code}), born ${patient.dateOfBirth}`, 11);
  para(`Onset ${when(e.onsetAt)}. Episode opened ${when(e.startedAt)}${view.startedBy ? ` by ${view.startedBy}` : ''}.`, 10, regular, MUTED);

  heading('Treatment');
  para(`${when(treatment.treatedAt)}, by ${treatment.practitioner?.name ?? 'the recorded practitioner'}.`);
  for (const l of treatment.lines ?? []) {
    const unit = l.unit === 'U' ? 'U' : 'mL';
    const zones = (l.doses ?? []).map((d) => `${ZONE_LABELS[d.zone] ?? d.zone} ${fmt(d.amountMilli / 1000)} ${unit}`).join('; ');
    para(`${l.productName} (${l.manufacturer}), lot ${l.lotNumber ?? 'not recorded'}, expiry ${l.expiryDate ?? 'not recorded'}: ${zones}.`, 10, regular, INK, 10);
  }

  heading('Signs');
  para(view.signs.length ? view.signs.map((s) => SIGN_LABELS[s]).join(', ') + '.' : 'None ticked.');
  if (view.signsNotes) para(view.signsNotes, 10, regular, MUTED);

  heading('What was done');
  if (!view.actions.length) para('Nothing recorded.');
  for (const a of view.actions) {
    const what =
      a.kind === 'hyaluronidase'
        ? `${a.productName}, lot ${a.lotNumber}${a.expiryDate ? ` (expiry ${a.expiryDate})` : ''}: ${fmt(a.amount ?? 0)} ${a.unitLabel ?? 'U'}${a.description ? `. ${a.description}` : ''}`
        : a.description;
    para(`${when(a.at)} · ${ACTION_LABELS[a.kind]}: ${what}${a.recordedBy ? ` (recorded by ${a.recordedBy})` : ''}`, 10, regular, INK);
  }

  heading('Follow-up');
  if (!view.followUps.length) para('None recorded yet.');
  for (const f of view.followUps) para(`${when(f.at)}${f.notes ? `: ${f.notes}` : ''}${f.photos.length ? ` (${f.photos.length} ${f.photos.length === 1 ? 'photo' : 'photos'})` : ''}`);

  heading('Outcome');
  para(view.outcome ? `${OUTCOME_LABELS[view.outcome]}${view.outcomeAt ? `, recorded ${when(view.outcomeAt)}` : ''}.` : 'Not recorded yet.');
  if (view.outcomeNotes) para(view.outcomeNotes, 10, regular, MUTED);

  // The latest photo of each view next to its baseline, up to a few pairs.
  const pairs = new Map<string, PhotoPair>();
  for (const f of view.followUps) for (const p of f.photos) pairs.set(p.viewKey, p);
  const chosen = [...pairs.values()].filter((p) => p.baseline).slice(-PHOTO_PAIRS);
  if (chosen.length) {
    heading('Photos against the baseline');
    const photos = await db.getRepository(Photo).findBy({ id: In(chosen.flatMap((p) => [p.baseline!.id, p.photo.id])) });
    const cellW = (W - 10) / 2;
    const cellH = 180;
    for (const pair of chosen) {
      ensure(cellH + 40);
      y -= 14;
      page.drawText(`${pair.viewKey}: baseline ${when(pair.baseline!.capturedAt)} · episode ${when(pair.photo.capturedAt)}`, { x: M, y, size: 9, font: regular, color: MUTED });
      y -= cellH + 6;
      for (const [i, id] of [pair.baseline!.id, pair.photo.id].entries()) {
        const photo = photos.find((p) => p.id === id)!;
        const variant = photo.variants.find((v) => (v.variant as string) === 'display' && v.format === 'jpeg');
        const x = M + i * (cellW + 10);
        page.drawRectangle({ x, y, width: cellW, height: cellH, color: SURROUND });
        if (!variant) continue;
        const { data, info } = await sharp(await deps.storage.get(variant.key)).resize(800, 800, { fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 82 }).toBuffer({ resolveWithObject: true });
        const img = await doc.embedJpg(data);
        const s = Math.min(cellW / info.width, cellH / info.height);
        page.drawImage(img, { x: x + (cellW - info.width * s) / 2, y: y + (cellH - info.height * s) / 2, width: info.width * s, height: info.height * s });
      }
    }
  }

  heading('Clinic protocol');
  para(settings.complicationProtocol || 'The clinic’s written complication protocol applies (no pointer was set in the clinic settings).');
  y -= 6;
  para(EPISODE_CAUTION, 9, regular, MUTED);

  const pages = doc.getPages();
  pages.forEach((p, i) =>
    p.drawText(`${settings.clinicName} · complication record of ${name} · generated ${when(generatedAt)} · page ${i + 1} of ${pages.length}`, { x: M, y: 24, size: 7.5, font: regular, color: MUTED }),
  );
  const out = await signPdf(doc, await signingIdentity(db, deps.config), {
    reason: `Complication record of ${name}, onset ${when(e.onsetAt)}`,
    signingTime: new Date(generatedAt),
    contactInfo: settings.clinicName,
    location: settings.clinicName,
  });
  return { bytes: out, sha256: sha256Hex(out), fileName: `complication-${patient.code}-${e.onsetAt.slice(0, 10)}.pdf` };
}
