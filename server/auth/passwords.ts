import argon2 from 'argon2';

// argon2id with the library's defaults (m = 64 MiB, t = 3, p = 4), above the OWASP Password
// Storage Cheat Sheet's minimum for argon2id (m = 19 MiB, t = 2, p = 1).
export function hashPassword(password: string): Promise<string> {
  return argon2.hash(password, { type: argon2.argon2id });
}

export async function verifyPassword(hash: string | null, password: string): Promise<boolean> {
  if (!hash) return false;
  try {
    return await argon2.verify(hash, password);
  } catch {
    return false;
  }
}

/** A hash to verify against when the account does not exist, so both paths take the same time. */
let dummyHash: Promise<string> | undefined;
export function dummyPasswordHash(): Promise<string> {
  dummyHash ??= hashPassword('netput-timing-equaliser');
  return dummyHash;
}
