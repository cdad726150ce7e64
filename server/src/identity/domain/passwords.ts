import { hash, verify, type Options } from '@node-rs/argon2';

/**
 * Argon2id with the OWASP Password Storage Cheat Sheet's first recommended setting
 * (m = 19 MiB, t = 2, p = 1). `algorithm: 2` is Argon2id in @node-rs/argon2's const enum,
 * which cannot be imported under `isolatedModules`.
 */
const argon2idOptions: Options = {
  algorithm: 2 as NonNullable<Options['algorithm']>,
  memoryCost: 19_456,
  timeCost: 2,
  parallelism: 1,
};

/** Hashes a password into a PHC string (`$argon2id$v=19$m=19456,t=2,p=1$...`). */
export function hashPassword(password: string): Promise<string> {
  return hash(password, argon2idOptions);
}

let dummyHash: Promise<string> | undefined;

/**
 * Whether `password` matches `passwordHash`. With no hash (unknown person, or no password
 * yet) it still runs one verification against a throw-away hash, so the answer takes as long
 * either way and timing does not reveal which e-mail addresses have accounts.
 */
export async function verifyPassword(
  passwordHash: string | null,
  password: string,
): Promise<boolean> {
  if (!passwordHash) {
    dummyHash ??= hashPassword('evalon-timing-equaliser');
    await verify(await dummyHash, password).catch(() => false);
    return false;
  }
  try {
    return await verify(passwordHash, password);
  } catch {
    // A malformed stored hash is treated as a wrong password rather than a crash.
    return false;
  }
}
