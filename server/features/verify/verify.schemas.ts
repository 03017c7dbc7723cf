import { z } from 'zod';

/** A SHA-256 as typed or pasted: spaces and colons are ignored, upper case is accepted. */
export const verifyHashSchema = z.object({
  sha256: z
    .string()
    .transform((s) => s.replace(/[\s:]/g, '').toLowerCase())
    .pipe(z.string().regex(/^[0-9a-f]{64}$/, 'A SHA-256 is 64 hexadecimal characters (0-9, a-f).')),
});

/** The only two answers of the public verify page; nothing else about the record or the patient. */
export type VerifyAnswer =
  | {
      result: 'signed-record';
      /** The SHA-256 that was checked (of the uploaded file, or as typed). */
      sha256: string;
      /** Day of signing in the clinic's time zone, YYYY-MM-DD. */
      signedOn: string;
      form: { title: string; version: number };
      state: 'current' | 'withdrawn';
      withdrawnOn: string | null;
      message: string;
    }
  | { result: 'not-a-record'; sha256: string; message: string };

export interface SigningCertificate {
  commonName: string;
  fingerprint: string;
  notAfter: string;
  pem: string;
}
