import { createHash, randomBytes } from 'node:crypto';

/** Lifetime of an invitation link. */
export const invitationLifetimeMs = 7 * 24 * 3_600_000;
/** Lifetime of a password-reset link. */
export const passwordResetLifetimeMs = 3_600_000;

/** A new one-time token (256 random bits, URL-safe) and the hash we store instead of it. */
export function newOneTimeToken(): { token: string; tokenHash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, tokenHash: hashToken(token) };
}

/** Hex SHA-256 of a token; only this reaches the database. */
export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

/** Why a presented token cannot be used, or null when it can. */
export type TokenProblem = 'unknown' | 'used' | 'expired';

/** Checks a stored token row against the clock. */
export function tokenProblem(
  row: { usedAt: Date | null; expiresAt: Date } | null,
  now: Date,
): TokenProblem | null {
  if (!row) return 'unknown';
  if (row.usedAt) return 'used';
  if (row.expiresAt.getTime() <= now.getTime()) return 'expired';
  return null;
}
