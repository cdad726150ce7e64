// Reads the carrier stand-in's settings from the environment (see docs/carrier-standin.md).
const off = (value) => ['none', 'off', 'false', '0'].includes(String(value).toLowerCase());

function nonNegativeInt(env, name) {
  const raw = env[name];
  if (raw === undefined || raw === '') return undefined;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0)
    throw new Error(`${name} must be a whole number, 0 or more, got "${raw}"`);
  return n;
}

/**
 * The port and createCarrierFake options from environment variables.
 * @param {Record<string, string | undefined>} [env]
 */
export function configFromEnv(env = process.env) {
  const portText = env.EVALON_CARRIER_PORT || '12211';
  const port = Number(portText);
  if (!Number.isInteger(port) || port < 0 || port > 65535) {
    throw new Error(`EVALON_CARRIER_PORT must be a port number, got "${portText}"`);
  }
  const appPort = env.EVALON_PORT || '8080';
  const webhookUrl =
    env.EVALON_CARRIER_WEBHOOK_URL || `http://127.0.0.1:${appPort}/api/webhooks/carrier`;
  const settings = Object.fromEntries(
    [
      ['retryBaseMs', nonNegativeInt(env, 'EVALON_CARRIER_WEBHOOK_RETRY_BASE_MS')],
      ['retryMaxMs', nonNegativeInt(env, 'EVALON_CARRIER_WEBHOOK_RETRY_MAX_MS')],
      ['maxAttempts', nonNegativeInt(env, 'EVALON_CARRIER_WEBHOOK_MAX_ATTEMPTS')],
      ['stepMs', nonNegativeInt(env, 'EVALON_CARRIER_STEP_MS')],
    ].filter(([, value]) => value !== undefined),
  );
  return {
    port,
    options: {
      webhookUrl: off(webhookUrl) ? null : webhookUrl,
      webhookSecret: env.EVALON_CARRIER_WEBHOOK_SECRET || 'carrier_whsec_evalon_local',
      apiKey: env.EVALON_CARRIER_API_KEY || 'carrier_key_evalon_local',
      // The running stand-in moves parcels by itself (one rung every 90 s) and now and then
      // sends an event twice or lets a later one overtake, as real tracking feeds do.
      settings: { stepMs: 90_000, ...settings },
      chaos: {
        duplicateRate: Number(env.EVALON_CARRIER_DUPLICATE_RATE ?? 0.1),
        shuffleMs: nonNegativeInt(env, 'EVALON_CARRIER_SHUFFLE_MS') ?? 250,
      },
    },
  };
}
