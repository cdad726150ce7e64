import { execFileSync } from 'node:child_process';
import { hashToken, newOneTimeToken, tokenProblem } from './tokens';

describe('one-time tokens', () => {
  it('hashes with SHA-256 as published in FIPS 180-2 (Appendix B.1, "abc")', () => {
    // FIPS 180-2, Appendix B.1: SHA-256("abc").
    expect(hashToken('abc')).toBe(
      'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad',
    );
  });

  it('matches coreutils sha256sum for a freshly issued token', () => {
    const { token, tokenHash } = newOneTimeToken();
    // Reference: GNU coreutils `sha256sum` over the same bytes.
    const reference = execFileSync('sha256sum', { input: token }).toString().split(' ')[0];
    expect(tokenHash).toBe(reference);
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/); // 32 random bytes, base64url without padding
  });

  it('issues different tokens each time', () => {
    const seen = new Set(Array.from({ length: 50 }, () => newOneTimeToken().token));
    expect(seen.size).toBe(50);
  });

  it('tells unknown, used and expired tokens apart', () => {
    const now = new Date('2027-03-01T12:00:00.000Z');
    expect(tokenProblem(null, now)).toBe('unknown');
    expect(
      tokenProblem(
        { usedAt: new Date('2027-03-01T11:00:00Z'), expiresAt: new Date('2027-03-02T00:00:00Z') },
        now,
      ),
    ).toBe('used');
    expect(tokenProblem({ usedAt: null, expiresAt: now }, now)).toBe('expired');
    expect(tokenProblem({ usedAt: null, expiresAt: new Date(now.getTime() + 1) }, now)).toBeNull();
  });
});
