import { randomBytes } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { signUnsubscribe, verifyUnsubscribe } from './unsubscribe-token.js';

describe('unsubscribe tokens (HMAC-SHA256)', () => {
  const secret = randomBytes(32);
  it('a signed token names its user', () => {
    const t = signUnsubscribe(secret, 42);
    expect(t).toMatch(/^42\.[A-Za-z0-9_-]{43}$/);
    expect(verifyUnsubscribe(secret, t)).toBe(42);
  });
  it('a changed user id, a changed signature or another secret is refused', () => {
    const t = signUnsubscribe(secret, 42);
    expect(verifyUnsubscribe(secret, t.replace(/^42/, '43'))).toBeNull();
    const sig = t.split('.')[1]!;
    const flipped = `${sig[0] === 'A' ? 'B' : 'A'}${sig.slice(1)}`;
    expect(verifyUnsubscribe(secret, `42.${flipped}`)).toBeNull();
    expect(verifyUnsubscribe(randomBytes(32), t)).toBeNull();
    expect(verifyUnsubscribe(secret, 'not-a-token')).toBeNull();
  });
});
