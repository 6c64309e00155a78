// Password hashing with argon2id (@node-rs/argon2, library defaults: 19 MiB, t=2, p=1,
// the OWASP Password Storage Cheat Sheet's first recommended argon2id setting).
import { hash, verify } from '@node-rs/argon2';

export function hashPassword(password: string): Promise<string> {
  return hash(password);
}

let dummyHash: Promise<string> | undefined;

/**
 * Verify a password. With `hashed` null (unknown e-mail, or no password chosen yet) a dummy hash
 * is still verified so the answer takes about as long as for a real user.
 */
export async function verifyPassword(hashed: string | null | undefined, password: string): Promise<boolean> {
  if (!hashed) {
    dummyHash ??= hash('tocsin-timing-equaliser');
    await verify(await dummyHash, password).catch(() => false);
    return false;
  }
  try {
    return await verify(hashed, password);
  } catch {
    return false;
  }
}
