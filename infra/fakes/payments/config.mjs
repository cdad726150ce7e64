// Reads the fake's settings from the environment (see docs/payments-fake.md for the list).
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..', '..');

/** Default state file: under the repository's git-ignored .data folder. */
export const DEFAULT_STATE_FILE = path.join(repoRoot, '.data', 'payments-fake', 'state.json');

const off = (value) => ['none', 'off', 'false', '0'].includes(String(value).toLowerCase());

function positiveInt(env, name) {
  const raw = env[name];
  if (raw === undefined || raw === '') return undefined;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1)
    throw new Error(`${name} must be a positive integer, got "${raw}"`);
  return n;
}

/**
 * The port and createPaymentsFake options from environment variables.
 * @param {Record<string, string | undefined>} [env]
 */
export function configFromEnv(env = process.env) {
  const portText = env.EVALON_PAYMENTS_PORT || '12111';
  const port = Number(portText);
  if (!Number.isInteger(port) || port < 0 || port > 65535) {
    throw new Error(`EVALON_PAYMENTS_PORT must be a port number, got "${portText}"`);
  }
  const appPort = env.EVALON_PORT || '8080';
  const webhookUrl =
    env.EVALON_PAYMENTS_WEBHOOK_URL || `http://127.0.0.1:${appPort}/api/webhooks/payments`;
  const webhookSecret = env.EVALON_PAYMENTS_WEBHOOK_SECRET || 'whsec_evalon_local';
  const stateFileRaw = env.EVALON_PAYMENTS_STATE_FILE;
  const stateFile =
    stateFileRaw === undefined || stateFileRaw === ''
      ? DEFAULT_STATE_FILE
      : off(stateFileRaw)
        ? null
        : path.resolve(stateFileRaw);
  const webhookSettings = Object.fromEntries(
    [
      ['retryBaseMs', positiveInt(env, 'EVALON_PAYMENTS_WEBHOOK_RETRY_BASE_MS')],
      ['retryMaxMs', positiveInt(env, 'EVALON_PAYMENTS_WEBHOOK_RETRY_MAX_MS')],
      ['maxAttempts', positiveInt(env, 'EVALON_PAYMENTS_WEBHOOK_MAX_ATTEMPTS')],
      ['timeoutMs', positiveInt(env, 'EVALON_PAYMENTS_WEBHOOK_TIMEOUT_MS')],
    ].filter(([, value]) => value !== undefined),
  );
  return {
    port,
    options: {
      publicUrl: env.EVALON_PAYMENTS_PUBLIC_URL || undefined,
      webhookEndpoints: off(webhookUrl) ? [] : [{ url: webhookUrl, secret: webhookSecret }],
      webhookSettings,
      stateFile,
    },
  };
}
