import { Column, Entity, PrimaryColumn } from 'typeorm';

/**
 * The clinic's PDF signing key and self-signed certificate, created at first start when no certificate is
 * configured. One row (id "clinic") in the shared database, so every app instance signs with the same key.
 * The key is stored only inside a PKCS#12 encrypted with TWINFRAME_SIGNING_PASSPHRASE, never in the clear.
 * Immutable: triggers refuse UPDATE and DELETE (a new key would need a new row and a deliberate switch).
 */
@Entity('signing_identity')
export class SigningIdentityRow {
  @PrimaryColumn('varchar', { length: 16 })
  id: string;

  /** Base64 of the PKCS#12 (key and certificate), encrypted with the configured passphrase. */
  @Column('text')
  p12: string;

  @Column('text')
  certificatePem: string;

  /** SHA-256 of the certificate's DER, lowercase hex. */
  @Column('varchar', { length: 64 })
  fingerprint: string;

  @Column('varchar', { length: 30 })
  createdAt: string;
}
