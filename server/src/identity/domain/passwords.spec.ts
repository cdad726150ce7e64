import { hashRaw } from '@node-rs/argon2';
import { hashPassword, verifyPassword } from './passwords';

describe('password hashing', () => {
  it('agrees with the Argon2 reference implementation’s published Argon2id vector', async () => {
    // P-H-C/phc-winner-argon2, src/test.c (version 0x13, Argon2id): t=2, m=2^16 KiB, p=1,
    // password "password", salt "somesalt".
    const encoded =
      '$argon2id$v=19$m=65536,t=2,p=1$c29tZXNhbHQ$CTFhFdXPJO1aFaMaO6Mm5c8y7cJHAph8ArZWb2GRPPc';
    const tag = '09316115d5cf24ed5a15a31a3ba326e5cf32edc24702987c02b6566f61913cf7';
    const raw = await hashRaw('password', {
      algorithm: 2,
      memoryCost: 65536,
      timeCost: 2,
      parallelism: 1,
      salt: Buffer.from('somesalt'),
    });
    expect(raw.toString('hex')).toBe(tag);
    await expect(verifyPassword(encoded, 'password')).resolves.toBe(true);
    await expect(verifyPassword(encoded, 'Password')).resolves.toBe(false);
  });

  it('stores Argon2id with the OWASP cheat-sheet setting (m=19 MiB, t=2, p=1) and a fresh salt', async () => {
    // OWASP Password Storage Cheat Sheet: Argon2id, m=19456 KiB, t=2, p=1.
    const a = await hashPassword('correct-horse-battery-staple');
    const b = await hashPassword('correct-horse-battery-staple');
    expect(a).toMatch(/^\$argon2id\$v=19\$m=19456,t=2,p=1\$[A-Za-z0-9+/]{22}\$[A-Za-z0-9+/]{43}$/);
    expect(a).not.toBe(b);
    await expect(verifyPassword(a, 'correct-horse-battery-staple')).resolves.toBe(true);
    await expect(verifyPassword(a, 'correct-horse-battery-stapler')).resolves.toBe(false);
  });

  it('answers false, not an error, for a missing or malformed stored hash', async () => {
    await expect(verifyPassword(null, 'anything')).resolves.toBe(false);
    await expect(verifyPassword('not-a-phc-string', 'anything')).resolves.toBe(false);
    // A missing hash still costs one real verification (timing does not reveal unknown e-mails).
    const started = process.hrtime.bigint();
    await verifyPassword(null, 'anything');
    expect(Number(process.hrtime.bigint() - started) / 1e6).toBeGreaterThan(1);
  });
});
