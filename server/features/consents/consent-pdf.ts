import fs from 'node:fs';
import { createRequire } from 'node:module';
import fontkit from '@pdf-lib/fontkit';
import MarkdownIt from 'markdown-it';
import { PDFDocument, rgb, type PDFFont, type PDFImage, type PDFPage } from 'pdf-lib';
import type { ShowcaseChannel, TemplateQuestion } from '../../entities/consent-template.js';
import { alignGlyphRecords } from './pdf-fonts.js';

const require = createRequire(import.meta.url);

/** Full TTFs shipped in an npm package: the split @fontsource files would draw boxes for letters like ł or ř. */
const FONT_FILES = {
  regular: require.resolve('@expo-google-fonts/noto-sans/400Regular/NotoSans_400Regular.ttf'),
  bold: require.resolve('@expo-google-fonts/noto-sans/700Bold/NotoSans_700Bold.ttf'),
  italic: require.resolve('@expo-google-fonts/noto-sans/400Regular_Italic/NotoSans_400Regular_Italic.ttf'),
};
let fontBytes: { regular: Buffer; bold: Buffer; italic: Buffer } | null = null;
const loadFonts = () =>
  (fontBytes ??= {
    regular: alignGlyphRecords(fs.readFileSync(FONT_FILES.regular)),
    bold: alignGlyphRecords(fs.readFileSync(FONT_FILES.bold)),
    italic: alignGlyphRecords(fs.readFileSync(FONT_FILES.italic)),
  });

export const CHANNEL_LABELS: Record<ShowcaseChannel, string> = {
  'clinic-website': 'Clinic website',
  'social-media': 'Social media',
  print: 'Print',
  'professional-education': 'Professional education',
};

/** Everything printed on a signed consent. */
export interface ConsentPdfInput {
  recordId: string;
  clinicName: string;
  template: { title: string; version: number; sha256: string; body: string; questions: TemplateQuestion[]; channels: ShowcaseChannel[]; kind: string };
  patient: { firstName: string; lastName: string; dateOfBirth: string; code: string };
  answers: Record<string, string>;
  flaggedQuestionIds: string[];
  channels: ShowcaseChannel[];
  crop: 'face' | 'lips-only' | null;
  signerName: string;
  /** A PNG the PDF can embed (normalised from the device's image). */
  signaturePng: Buffer;
  signedAt: string;
  shownAt: string | null;
  timeZone: string;
  startedBy: string;
  signedIp: string | null;
  signedUserAgent: string | null;
  /** The public page where a reader checks this PDF (printed in the footer). */
  verifyUrl: string;
}

/** "9 December 2026, 14:32:05 (Europe/London, GMT+00:00)": local time with its zone and UTC offset. */
export function formatInZone(iso: string, timeZone: string): string {
  const d = new Date(iso);
  const date = new Intl.DateTimeFormat('en-GB', { timeZone, day: 'numeric', month: 'long', year: 'numeric' }).format(d);
  const time = new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23' }).format(d);
  const offset = new Intl.DateTimeFormat('en-GB', { timeZone, timeZoneName: 'longOffset' }).formatToParts(d).find((p) => p.type === 'timeZoneName')?.value ?? '';
  return `${date}, ${time} (${timeZone}, ${offset === 'GMT' ? 'GMT+00:00' : offset})`;
}

const A4 = { width: 595.28, height: 841.89 };
const M = { left: 56, right: 56, top: 60, bottom: 78 };
const INK = rgb(0.11, 0.11, 0.12);
const MUTED = rgb(0.38, 0.38, 0.4);
const ACCENT = rgb(0.62, 0.16, 0.11);

type Run = { text: string; font: PDFFont };

/** A small flowing layout: wraps runs of text across lines and pages. */
class Layout {
  page: PDFPage;
  y: number;
  constructor(
    readonly doc: PDFDocument,
    readonly fonts: { regular: PDFFont; bold: PDFFont; italic: PDFFont },
  ) {
    this.page = this.newPage();
    this.y = A4.height - M.top;
  }
  get width() {
    return A4.width - M.left - M.right;
  }
  newPage(): PDFPage {
    this.page = this.doc.addPage([A4.width, A4.height]);
    this.y = A4.height - M.top;
    return this.page;
  }
  ensure(height: number) {
    if (this.y - height < M.bottom) this.newPage();
  }
  gap(h: number) {
    this.y -= h;
  }
  /** Wraps `runs` into lines of at most the text width (minus `indent`) and draws them. */
  runs(runs: Run[], size: number, opts: { indent?: number; color?: ReturnType<typeof rgb>; lineHeight?: number; marker?: string } = {}) {
    const indent = opts.indent ?? 0;
    const maxW = this.width - indent;
    const lh = opts.lineHeight ?? size * 1.42;
    const words: Run[] = [];
    for (const r of runs) {
      for (const piece of r.text.split(/(\s+)/)) if (piece) words.push({ text: /^\s+$/.test(piece) ? ' ' : piece, font: r.font });
    }
    const lines: Run[][] = [];
    let line: Run[] = [];
    let w = 0;
    const widthOf = (r: Run) => r.font.widthOfTextAtSize(r.text, size);
    for (const word of words) {
      if (word.text === ' ') {
        if (line.length) {
          line.push(word);
          w += widthOf(word);
        }
        continue;
      }
      let ww = widthOf(word);
      if (w + ww > maxW && line.length) {
        while (line.length && line[line.length - 1].text === ' ') line.pop();
        lines.push(line);
        line = [];
        w = 0;
      }
      // A single word wider than the line (a long hash, a URL) is broken by characters.
      let rest = word;
      while (ww > maxW) {
        let n = rest.text.length;
        while (n > 1 && rest.font.widthOfTextAtSize(rest.text.slice(0, n), size) > maxW) n--;
        lines.push([{ text: rest.text.slice(0, n), font: rest.font }]);
        rest = { text: rest.text.slice(n), font: rest.font };
        ww = widthOf(rest);
      }
      line.push(rest);
      w += ww;
    }
    while (line.length && line[line.length - 1].text === ' ') line.pop();
    if (line.length) lines.push(line);
    lines.forEach((l, i) => {
      this.ensure(lh);
      this.y -= lh;
      if (i === 0 && opts.marker) this.page.drawText(opts.marker, { x: M.left + indent - 14, y: this.y, size, font: this.fonts.regular, color: opts.color ?? INK });
      let x = M.left + indent;
      for (const r of l) {
        this.page.drawText(r.text, { x, y: this.y, size, font: r.font, color: opts.color ?? INK });
        x += widthOf(r);
      }
    });
  }
  text(text: string, size: number, font: PDFFont = this.fonts.regular, opts: Parameters<Layout['runs']>[2] = {}) {
    this.runs([{ text, font }], size, opts);
  }
  rule() {
    this.ensure(10);
    this.y -= 6;
    this.page.drawLine({ start: { x: M.left, y: this.y }, end: { x: A4.width - M.right, y: this.y }, thickness: 0.6, color: rgb(0.8, 0.78, 0.75) });
    this.y -= 4;
  }
  image(img: PDFImage, maxW: number, maxH: number) {
    const scale = Math.min(maxW / img.width, maxH / img.height, 1);
    const w = img.width * scale;
    const h = img.height * scale;
    this.ensure(h + 8);
    this.y -= h + 4;
    this.page.drawRectangle({ x: M.left, y: this.y - 2, width: maxW, height: h + 6, borderColor: rgb(0.8, 0.78, 0.75), borderWidth: 0.6 });
    this.page.drawImage(img, { x: M.left + 4, y: this.y + 1, width: w, height: h });
    this.y -= 6;
  }
}

const md = new MarkdownIt({ html: false, linkify: false, typographer: false });

type MdToken = ReturnType<InstanceType<typeof MarkdownIt>['parse']>[number];

/** Draws Markdown (headings, paragraphs, lists, bold, italic) without any raw HTML. */
function drawMarkdown(layout: Layout, source: string) {
  const tokens = md.parse(source, {});
  const lists: { ordered: boolean; n: number }[] = [];
  let heading = 0;
  const inlineRuns = (t: MdToken): Run[] => {
    const runs: Run[] = [];
    let bold = heading > 0;
    let italic = false;
    for (const c of t.children ?? []) {
      if (c.type === 'strong_open') bold = true;
      else if (c.type === 'strong_close') bold = heading > 0;
      else if (c.type === 'em_open') italic = true;
      else if (c.type === 'em_close') italic = false;
      else if (c.type === 'softbreak' || c.type === 'hardbreak') runs.push({ text: ' ', font: layout.fonts.regular });
      else if (c.type === 'text' || c.type === 'code_inline') {
        runs.push({ text: c.content, font: bold ? layout.fonts.bold : italic ? layout.fonts.italic : layout.fonts.regular });
      }
    }
    return runs;
  };
  let pendingMarker: string | undefined;
  for (const t of tokens) {
    switch (t.type) {
      case 'heading_open':
        heading = Number(t.tag.slice(1));
        layout.gap(6);
        layout.ensure(40);
        break;
      case 'heading_close':
        heading = 0;
        break;
      case 'bullet_list_open':
      case 'ordered_list_open':
        lists.push({ ordered: t.type === 'ordered_list_open', n: Number(t.attrGet('start') ?? 1) });
        break;
      case 'bullet_list_close':
      case 'ordered_list_close':
        lists.pop();
        layout.gap(3);
        break;
      case 'list_item_open': {
        const l = lists[lists.length - 1];
        pendingMarker = l.ordered ? `${l.n++}.` : '•';
        break;
      }
      case 'paragraph_close':
        if (!lists.length) layout.gap(5);
        break;
      case 'inline': {
        const size = heading === 1 ? 14 : heading ? 12 : 10;
        layout.runs(inlineRuns(t), size, { indent: lists.length * 16, marker: pendingMarker });
        pendingMarker = undefined;
        if (heading) layout.gap(2);
        break;
      }
      case 'hr':
        layout.rule();
        break;
      default:
        break;
    }
  }
}

function answerText(q: TemplateQuestion, a: string | undefined): string {
  if (a === undefined || a === '') return 'No answer';
  if (q.type === 'yes-no') return a === 'yes' ? 'Yes' : 'No';
  return a;
}

/**
 * Lays out the signed consent: form text, answers, channels, signature, typed name, time, and a footer with what a
 * reader can check (the record id and the verify address). Returns the document unsaved: `signPdf` saves and signs it.
 */
export async function renderConsentPdf(input: ConsentPdfInput): Promise<PDFDocument> {
  const doc = await PDFDocument.create();
  doc.registerFontkit(fontkit);
  const bytes = loadFonts();
  const fonts = {
    regular: await doc.embedFont(bytes.regular, { subset: true }),
    bold: await doc.embedFont(bytes.bold, { subset: true }),
    italic: await doc.embedFont(bytes.italic, { subset: true }),
  };
  const signedAt = new Date(input.signedAt);
  doc.setTitle(`${input.template.title} (version ${input.template.version})`);
  doc.setAuthor(input.clinicName);
  doc.setSubject(`Signed consent record ${input.recordId}`);
  doc.setCreator('Twinframe');
  doc.setProducer('Twinframe');
  doc.setCreationDate(signedAt);
  doc.setModificationDate(signedAt);

  const L = new Layout(doc, fonts);
  const { template, patient } = input;
  L.text(input.clinicName.toUpperCase(), 9, fonts.bold, { color: ACCENT });
  L.gap(4);
  L.text(template.title, 18, fonts.bold, { lineHeight: 23 });
  L.gap(2);
  L.text(`Form version ${template.version}`, 10, fonts.regular, { color: MUTED });
  L.text(`Form text SHA-256: ${template.sha256}`, 7.5, fonts.regular, { color: MUTED });
  L.gap(6);
  L.runs(
    [
      { text: 'Patient: ', font: fonts.bold },
      { text: `${patient.firstName} ${patient.lastName}`, font: fonts.regular },
      { text: ' · Date of birth: ', font: fonts.bold },
      { text: patient.dateOfBirth, font: fonts.regular },
      { text: ' · Clinic code: ', font: fonts.bold },
      { text: patient.code, font: fonts.regular },
    ],
    10,
  );
  L.rule();
  L.gap(4);
  drawMarkdown(L, template.body);

  if (template.questions.length) {
    L.rule();
    L.gap(4);
    L.text(template.kind === 'screening' ? 'Your answers' : 'Your choices', 12, fonts.bold);
    L.gap(2);
    for (const q of template.questions) {
      L.ensure(34);
      L.text(q.label, 10, fonts.regular, { color: MUTED });
      const flagged = input.flaggedQuestionIds.includes(q.id);
      L.runs(
        [
          { text: answerText(q, input.answers[q.id]), font: fonts.bold },
          ...(flagged ? [{ text: '   (your practitioner will review this answer with you)', font: fonts.italic }] : []),
        ],
        10.5,
        { indent: 12 },
      );
      L.gap(3);
    }
  }

  if (template.kind === 'showcase') {
    L.rule();
    L.gap(4);
    L.text('Where your results may be shown', 12, fonts.bold);
    L.gap(2);
    for (const c of template.channels) {
      const yes = input.channels.includes(c);
      L.runs([{ text: `${CHANNEL_LABELS[c]}: `, font: fonts.regular }, { text: yes ? 'Yes' : 'No', font: fonts.bold }], 10.5, { indent: 12 });
    }
    L.gap(4);
    L.runs(
      [
        { text: 'How much of your face: ', font: fonts.regular },
        { text: input.crop === 'face' ? 'Whole face may be shown' : 'Lips-only crop (face not shown)', font: fonts.bold },
      ],
      10.5,
      { indent: 12 },
    );
  }

  L.rule();
  L.gap(4);
  L.ensure(190);
  L.text('Signature', 12, fonts.bold);
  L.gap(2);
  L.image(await doc.embedPng(input.signaturePng), 240, 96);
  L.runs([{ text: 'Full name typed by the signer: ', font: fonts.regular }, { text: input.signerName, font: fonts.bold }], 10.5);
  L.runs([{ text: 'Signed: ', font: fonts.regular }, { text: formatInZone(input.signedAt, input.timeZone), font: fonts.bold }], 10.5);
  L.text(`Signed (UTC): ${signedAt.toISOString()}`, 9, fonts.regular, { color: MUTED });
  L.gap(8);
  L.text('How this form was signed', 10, fonts.bold, { color: MUTED });
  const evidence = [
    `Signed on a clinic device in a hand-over session started by ${input.startedBy}.`,
    input.shownAt ? `Form first shown: ${formatInZone(input.shownAt, input.timeZone)}.` : null,
    `Signing device address: ${input.signedIp ?? 'unknown'}.`,
    `Signing device browser: ${(input.signedUserAgent ?? 'unknown').slice(0, 160)}.`,
  ].filter((s): s is string => Boolean(s));
  for (const line of evidence) L.text(line, 8.5, fonts.regular, { color: MUTED });

  const pages = doc.getPages();
  pages.forEach((page, i) => {
    const y1 = 44;
    page.drawLine({ start: { x: M.left, y: y1 + 12 }, end: { x: A4.width - M.right, y: y1 + 12 }, thickness: 0.5, color: rgb(0.8, 0.78, 0.75) });
    page.drawText(`${input.clinicName} · Consent record ${input.recordId} · Page ${i + 1} of ${pages.length}`, { x: M.left, y: y1, size: 7.5, font: fonts.regular, color: MUTED });
    page.drawText(`Digitally signed by the clinic. Check this PDF at ${input.verifyUrl}`, { x: M.left, y: y1 - 11, size: 7.5, font: fonts.regular, color: MUTED });
  });
  return doc;
}
