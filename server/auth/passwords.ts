import argon2 from 'argon2';

/** argon2id with the library's defaults (64 MiB, 3 passes): OWASP's recommended password hash. */
export const hashPassword = (plain: string): Promise<string> => argon2.hash(plain, { type: argon2.argon2id });

let dummyHash: Promise<string> | undefined;

/** Verifies a password; with no stored hash it still spends the same time, so unknown e-mails are not revealed. */
export async function verifyPassword(hash: string | null, plain: string): Promise<boolean> {
  if (!hash) {
    dummyHash ??= hashPassword('twinframe-timing-equaliser');
    await argon2.verify(await dummyHash, plain).catch(() => false);
    return false;
  }
  return argon2.verify(hash, plain).catch(() => false);
}
