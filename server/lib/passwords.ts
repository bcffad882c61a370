import argon2 from 'argon2';

/**
 * argon2id with the library's defaults (m = 64 MiB, t = 3, p = 4), which meet OWASP's password storage
 * guidance for argon2id; the parameters are stored inside each hash, so raising them later keeps old hashes valid.
 */
export function hashPassword(password: string): Promise<string> {
  return argon2.hash(password, { type: argon2.argon2id });
}

export async function verifyPassword(hash: string, password: string): Promise<boolean> {
  try {
    return await argon2.verify(hash, password);
  } catch {
    return false;
  }
}

let dummyHash: Promise<string> | undefined;
/** Spends the same work as a real check, so an unknown e-mail cannot be told apart by response time. */
export async function verifyAgainstDummy(password: string): Promise<false> {
  dummyHash ??= hashPassword('not-a-real-password-for-timing-only');
  await verifyPassword(await dummyHash, password);
  return false;
}
