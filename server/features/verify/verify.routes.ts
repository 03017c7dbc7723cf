import type { Request, RequestHandler, Router } from 'express';
import multer from 'multer';
import { PDFDocument } from 'pdf-lib';
import type { Deps } from '../../deps.js';
import { ConsentRecord } from '../../entities/consent-record.js';
import { ConsentTemplate } from '../../entities/consent-template.js';
import { audit } from '../../lib/audit.js';
import { HttpError } from '../../lib/errors.js';
import { limitPerAddress } from '../../lib/rate-limit.js';
import { parsed, validate } from '../../lib/validate.js';
import { signingIdentity } from '../../signing/pdf-signing.js';
import { sha256Hex } from '../consents/hash.js';
import { rowIntact } from '../integrity/walk.js';
import { verifyHashSchema, type SigningCertificate, type VerifyAnswer } from './verify.schemas.js';

/** Consent PDFs are tens of kilobytes; anything past this is not one of them. */
export const VERIFY_MAX_BYTES = 10 * 1024 * 1024;

const receivePdf: RequestHandler = (req, res, next) => {
  multer({ storage: multer.memoryStorage(), limits: { fileSize: VERIFY_MAX_BYTES, files: 1, fields: 2, parts: 3 } }).single('pdf')(req, res, (err?: unknown) => {
    if (!err) return next();
    if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_SIZE') {
      return next(new HttpError(413, 'FILE_TOO_LARGE', `The file is larger than ${VERIFY_MAX_BYTES / 1024 / 1024} MB; a consent PDF from the clinic is much smaller.`));
    }
    next(new HttpError(400, 'BAD_UPLOAD', 'Send one PDF in the form field "pdf".'));
  });
};

const dayIn = (iso: string, timeZone: string) => new Date(iso).toLocaleDateString('en-CA', { timeZone });
const spoken = (day: string) => new Date(`${day}T12:00:00Z`).toLocaleDateString('en-GB', { timeZone: 'UTC', day: 'numeric', month: 'long', year: 'numeric' });

/**
 * The public verify page's API: no sign-in, rate limited per address, every check access-logged, nothing uploaded
 * kept (the file is read in memory, hashed and dropped). It answers only whether the bytes are a signed consent
 * record of this clinic, with its date, form and state, and says nothing else about the record or the patient.
 */
export function registerVerifyRoutes(r: Router, deps: Deps): void {
  const { db, config } = deps;

  const limit = limitPerAddress(db, {
    name: 'verify',
    limit: config.verify.limit,
    windowMinutes: config.verify.windowMinutes,
    message: `Too many checks from this address. Please try again in ${config.verify.windowMinutes} minutes.`,
    onLimited: (req) => audit(db, req, { action: 'verify.limited', details: { path: req.path } }),
  });

  /** Looks up the exact bytes' hash; a record whose chained row no longer holds its place does not count. */
  async function answer(req: Request, sha256: string, method: 'pdf' | 'hash'): Promise<VerifyAnswer> {
    const record = await db.getRepository(ConsentRecord).findOneBy({ pdfSha256: sha256 });
    const intact = record ? await rowIntact(db, 'consent', record as unknown as Record<string, unknown>) : false;
    await audit(db, req, {
      action: 'verify.check',
      patientId: intact ? record!.patientId : null,
      targetType: intact ? 'consent' : null,
      targetId: intact ? record!.id : null,
      details: { method, result: intact ? 'signed-record' : 'not-a-record', ...(record && !intact ? { integrity: 'broken' } : {}) },
    });
    if (!record || !intact) {
      return { result: 'not-a-record', sha256, message: 'This is not a record of this clinic, or it has been altered.' };
    }
    const template = await db.getRepository(ConsentTemplate).findOneByOrFail({ id: record.templateId });
    const signedOn = dayIn(record.signedAt, record.timeZone);
    const withdrawnOn = record.withdrawnAt ? (record.withdrawalDate ?? dayIn(record.withdrawnAt, record.timeZone)) : null;
    const form = `form “${template.title}” v${record.templateVersion}`;
    return {
      result: 'signed-record',
      sha256,
      signedOn,
      form: { title: template.title, version: record.templateVersion },
      state: withdrawnOn ? 'withdrawn' : 'current',
      withdrawnOn,
      message: `This is the signed consent record of ${spoken(signedOn)}, ${form}, ${withdrawnOn ? `withdrawn on ${spoken(withdrawnOn)}` : 'current'}.`,
    };
  }

  r.post('/api/verify/pdf', limit, receivePdf, async (req, res) => {
    const file = req.file;
    if (!file) {
      await audit(db, req, { action: 'verify.check', details: { method: 'pdf', result: 'refused', reason: 'NO_FILE' } });
      throw new HttpError(400, 'NO_FILE', 'Choose the PDF to check.');
    }
    const refuse = async (status: number, code: string, message: string) => {
      await audit(db, req, { action: 'verify.check', details: { method: 'pdf', result: 'refused', reason: code, bytes: file.size } });
      return new HttpError(status, code, message);
    };
    // The content decides, not the file name or the browser's type: a PDF starts with "%PDF-" (ISO 32000-1 §7.5.2).
    if (!file.buffer.subarray(0, 1024).includes('%PDF-')) throw await refuse(415, 'NOT_PDF', 'This file is not a PDF. Choose the PDF document you received from the clinic.');
    let encrypted = false;
    try {
      encrypted = (await PDFDocument.load(file.buffer, { ignoreEncryption: true, updateMetadata: false, throwOnInvalidObject: false })).isEncrypted;
    } catch {
      // Unreadable as a PDF: not a record as it stands (a damaged copy of one reads as altered).
    }
    if (encrypted) {
      throw await refuse(422, 'PDF_ENCRYPTED', 'This PDF is password-protected or encrypted, so its bytes cannot be checked. Check the original file you received from the clinic.');
    }
    res.json(await answer(req, sha256Hex(file.buffer), 'pdf'));
  });

  const byHash = validate({ body: verifyHashSchema });
  r.post('/api/verify/hash', limit, byHash, async (req, res) => {
    const { body } = parsed(req, byHash);
    res.json(await answer(req, body.sha256, 'hash'));
  });

  /** The clinic's signing certificate, so a reader can match the signer their PDF reader shows. */
  r.get('/api/verify/certificate', async (_req, res) => {
    const id = await signingIdentity(db, config);
    const cert: SigningCertificate = { commonName: id.commonName, fingerprint: id.fingerprint, notAfter: id.notAfter, pem: id.certificatePem };
    res.set('Cache-Control', 'public, max-age=3600');
    res.json(cert);
  });
}
