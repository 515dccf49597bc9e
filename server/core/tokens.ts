import { createHash, randomBytes } from 'node:crypto';

/** A URL-safe random token of 256 bits. */
export function newToken(): string {
  return randomBytes(32).toString('base64url');
}

export function sha256(text: string): string {
  return createHash('sha256').update(text).digest('hex');
}
