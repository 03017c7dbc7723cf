import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import { ConsentTemplate } from '../../server/entities/consent-template.js';
import { insertDemoTemplates } from '../../server/features/consents/demo-templates.js';
import type { Client, TestApp } from './app.js';

/** A drawn signature as the pad sends it: transparent PNG with a dark stroke (or nothing, when `empty`). */
export async function signaturePng({ empty = false, width = 600, height = 200 } = {}): Promise<string> {
  const stroke = empty
    ? ''
    : `<path d="M30 140 C 90 30, 160 180, 240 80 S 380 160, 440 60 L 560 120" stroke="#111" stroke-width="5" fill="none" stroke-linecap="round"/>`;
  const png = await sharp({ create: { width, height, channels: 4, background: { r: 0, g: 0, b: 0, alpha: 0 } } })
    .composite([{ input: Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}">${stroke}</svg>`) }])
    .png()
    .toBuffer();
  return `data:image/png;base64,${png.toString('base64')}`;
}

/** Publishes the demo forms and returns them by kind. */
export async function demoForms(t: TestApp, adminId: string): Promise<Record<'treatment' | 'photography' | 'showcase' | 'screening', ConsentTemplate>> {
  const rows = await insertDemoTemplates(t.db, adminId, new Date().toISOString());
  return Object.fromEntries(rows.map((r) => [r.kind, r])) as Record<'treatment' | 'photography' | 'showcase' | 'screening', ConsentTemplate>;
}

/** Answers every required question of a form, choosing the unflagged answer unless told otherwise. */
export function answersFor(t: ConsentTemplate, override: Record<string, string> = {}): Record<string, string> {
  const out: Record<string, string> = {};
  for (const q of JSON.parse(t.questions) as { id: string; type: string; options?: string[]; required: boolean; flagWhen?: string[] }[]) {
    if (!q.required) continue;
    if (q.type === 'yes-no') out[q.id] = q.flagWhen?.includes('yes') ? 'no' : 'yes';
    else if (q.type === 'choice') out[q.id] = q.options!.find((o) => !q.flagWhen?.includes(o))!;
    else out[q.id] = 'none';
  }
  return { ...out, ...override };
}

/** Starts a hand-over on "this device": the staff client becomes the patient's tablet. */
export async function handOver(staff: Client, patientId: string, templateIds: string[]): Promise<Client> {
  const res = await staff.post('/api/handovers').send({ patientId, templateIds, mode: 'this-device' });
  if (res.status !== 201) throw new Error(`hand-over failed: ${res.status} ${JSON.stringify(res.body)}`);
  staff.csrf = res.body.csrfToken;
  return staff;
}

const PDF_TOOL_ARGS = {
  qpdf: (file: string) => ['--check', file],
  pdftotext: (file: string, args: string[]) => ['-enc', 'UTF-8', ...args, file, '-'],
  pdfimages: (file: string) => ['-list', file],
  // Poppler's signature check (no network: the clinic's certificate has no OCSP address anyway).
  pdfsig: (file: string) => ['-no-ocsp', file],
};

/** Writes a PDF to a temp file and runs a poppler/qpdf tool on it. */
export function pdfTool(pdf: Buffer, tool: keyof typeof PDF_TOOL_ARGS, args: string[] = []): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tf-pdf-'));
  const file = path.join(dir, 'doc.pdf');
  fs.writeFileSync(file, pdf);
  try {
    return execFileSync(tool, PDF_TOOL_ARGS[tool](file, args), { encoding: 'utf8' });
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

/** The signature dictionaries (/Type /Sig) of a PDF as qpdf's JSON (version 2) decodes them: text strings as "u:…". */
export function signatureDictionaries(pdf: Buffer): Record<string, unknown>[] {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tf-pdf-'));
  const file = path.join(dir, 'doc.pdf');
  fs.writeFileSync(file, pdf);
  try {
    const json = JSON.parse(execFileSync('qpdf', ['--json=2', '--json-key=qpdf', file], { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 }));
    const objects = Object.values(json.qpdf[1] as Record<string, { value?: Record<string, unknown> }>);
    return objects.map((o) => o.value).filter((v): v is Record<string, unknown> => Boolean(v && typeof v === 'object' && v['/Type'] === '/Sig'));
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

/**
 * A copy of a PDF with one byte changed: a hex digit of the document title in the Info dictionary ("Treatment" reads
 * "Ureatment"), so the file stays well-formed for qpdf while its bytes differ from what was signed.
 */
export function alterOneByte(pdf: Buffer): Buffer {
  const out = Buffer.from(pdf);
  const at = out.indexOf('/Title <FEFF00');
  if (at < 0) throw new Error('no hex title in this PDF');
  const digit = at + '/Title <FEFF00'.length;
  out[digit] = out[digit] === 0x39 ? 0x38 : out[digit] + 1;
  return out;
}

/** GET a binary response as a Buffer through supertest. */
export function binary(req: ReturnType<Client['get']>) {
  return req.buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on('data', (c: Buffer) => chunks.push(c));
    res.on('end', () => cb(null, Buffer.concat(chunks)));
  });
}
