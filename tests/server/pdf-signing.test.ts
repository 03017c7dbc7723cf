import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import forge from 'node-forge';
import { PDFDocument } from 'pdf-lib';
import { afterAll, describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/config.js';
import { openDatabase } from '../../server/db/data-source.js';
import { SigningIdentityRow } from '../../server/entities/signing-identity.js';
import { signingIdentity, signPdf } from '../../server/signing/pdf-signing.js';
import { pdfTool, signatureDictionaries } from '../helpers/consents.js';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tf-signing-'));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

async function onePagePdf(text: string) {
  const doc = await PDFDocument.create();
  doc.addPage([300, 200]).drawText(text, { x: 20, y: 100, size: 12 });
  return doc;
}

/** A small certificate authority and a clinic certificate it issued, packed as a CA hands them out (PKCS#12). */
function authorityIssuedP12(passphrase: string): { p12: Buffer; caFingerprint: string } {
  const make = (cn: string) => {
    const keys = forge.pki.rsa.generateKeyPair({ bits: 2048, e: 0x10001 });
    const cert = forge.pki.createCertificate();
    cert.publicKey = keys.publicKey;
    cert.validity.notBefore = new Date(Date.now() - 60_000);
    cert.validity.notAfter = new Date(Date.now() + 365 * 86_400_000);
    cert.setSubject([{ name: 'commonName', value: cn }]);
    return { keys, cert };
  };
  const ca = make('Invented Trust Services Root');
  ca.cert.serialNumber = '0a';
  ca.cert.setIssuer(ca.cert.subject.attributes);
  ca.cert.setExtensions([{ name: 'basicConstraints', cA: true }, { name: 'keyUsage', keyCertSign: true }]);
  ca.cert.sign(ca.keys.privateKey, forge.md.sha256.create());
  const leaf = make('Harbour Street Clinic');
  leaf.cert.serialNumber = '0b';
  leaf.cert.setIssuer(ca.cert.subject.attributes);
  leaf.cert.setExtensions([{ name: 'keyUsage', digitalSignature: true, nonRepudiation: true }]);
  leaf.cert.sign(ca.keys.privateKey, forge.md.sha256.create());
  const der = forge.asn1.toDer(forge.pkcs12.toPkcs12Asn1(leaf.keys.privateKey, [leaf.cert, ca.cert], passphrase, { algorithm: '3des' })).getBytes();
  return { p12: Buffer.from(der, 'binary'), caFingerprint: forge.md.sha256.create().update(forge.asn1.toDer(forge.pki.certificateToAsn1(ca.cert)).getBytes()).digest().toHex() };
}

describe('the clinic signing identity', () => {
  it('is created once at first start and shared by every instance on the same database', async () => {
    const file = path.join(dir, 'shared.sqlite');
    const config = loadConfig({ TWINFRAME_DATA_DIR: dir });
    // Two app instances starting together on one database: both may generate a key, one row wins, both use it.
    const [a, b] = await Promise.all([openDatabase(file), openDatabase(file)]);
    try {
      const [ia, ib] = await Promise.all([signingIdentity(a, config), signingIdentity(b, config)]);
      expect(ia.fingerprint).toBe(ib.fingerprint);
      expect(ia.source).toBe('generated');
      expect(await a.getRepository(SigningIdentityRow).count()).toBe(1);
      const row = await a.getRepository(SigningIdentityRow).findOneByOrFail({ id: 'clinic' });
      // The key never lies in the database in the clear: only inside the encrypted PKCS#12.
      expect(row.p12).not.toMatch(/PRIVATE KEY/);
      expect(Buffer.from(row.p12, 'base64').toString('latin1')).not.toMatch(/PRIVATE KEY/);
      expect(row.certificatePem).toMatch(/^-----BEGIN CERTIFICATE-----/);
      // The certificate names the clinic and is self-signed with an RSA-3072 key.
      const cert = forge.pki.certificateFromPem(row.certificatePem);
      expect(cert.subject.getField('CN').value).toBe('Linden Row Aesthetics');
      expect((cert.publicKey as forge.pki.rsa.PublicKey).n.bitLength()).toBe(3072);
      expect(cert.verify(cert)).toBe(true);
      await expect(a.query(`UPDATE "signing_identity" SET "fingerprint" = 'x'`)).rejects.toThrow(/immutable/);
      await expect(a.query(`DELETE FROM "signing_identity"`)).rejects.toThrow(/immutable/);

      // A restart with another passphrase cannot open the stored key, and says so rather than making a new one.
      const c = await openDatabase(file);
      try {
        await expect(signingIdentity(c, loadConfig({ TWINFRAME_DATA_DIR: dir, TWINFRAME_SIGNING_PASSPHRASE: 'another' }))).rejects.toThrow(/cannot be opened with TWINFRAME_SIGNING_PASSPHRASE/);
      } finally {
        await c.destroy();
      }
    } finally {
      await Promise.all([a.destroy(), b.destroy()]);
    }
  });

  it("signs with a certificate supplied by configuration (an authority's PKCS#12 with its chain)", async () => {
    const { p12 } = authorityIssuedP12('from-the-authority');
    const file = path.join(dir, 'clinic.p12');
    fs.writeFileSync(file, p12);
    const db = await openDatabase(':memory:');
    try {
      const config = loadConfig({ TWINFRAME_SIGNING_P12: file, TWINFRAME_SIGNING_PASSPHRASE: 'from-the-authority' });
      const identity = await signingIdentity(db, config);
      expect(identity).toMatchObject({ source: 'configured', commonName: 'Harbour Street Clinic' });
      // Nothing is generated or stored when a certificate is configured.
      expect(await db.getRepository(SigningIdentityRow).count()).toBe(0);
      const pdf = await signPdf(await onePagePdf('Configured certificate'), identity, {
        reason: 'Consent of Ana Núñez (née O\'Hara), form Lip filler (HA) v3',
        signingTime: new Date('2026-03-04T10:20:30Z'),
        contactInfo: 'https://clinic.example/verify',
        location: 'Harbour Street Clinic',
      });
      // pdfsig (poppler-utils) checks the CMS signature (RFC 5652) over the byte range.
      const report = pdfTool(pdf, 'pdfsig');
      expect(report).toContain('Signature Validation: Signature is Valid.');
      expect(report).toContain('Signer Certificate Common Name: Harbour Street Clinic');
      expect(report).toContain('Signing Time: Mar 04 2026 10:20:30');
      expect(pdfTool(pdf, 'qpdf')).toMatch(/No syntax or stream encoding errors found/);
      // Parentheses, an apostrophe and accents survive as a PDF text string (read back by qpdf).
      const [sig] = signatureDictionaries(pdf);
      expect(sig['/Reason']).toBe("u:Consent of Ana Núñez (née O'Hara), form Lip filler (HA) v3");
      expect(sig['/SubFilter']).toBe('/adbe.pkcs7.detached');
    } finally {
      await db.destroy();
    }
  });
});
