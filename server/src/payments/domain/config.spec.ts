import { ConfigError, loadConfig } from '../../config';

describe('payments configuration', () => {
  it('points test keys at the local payments fake by default', () => {
    const c = loadConfig({});
    expect(c.payments).toEqual({
      secretKey: 'sk_test_evalon_local',
      endpoint: { host: '127.0.0.1', port: 12111, protocol: 'http' },
      webhookSecret: 'whsec_evalon_local',
      timeoutMs: 20_000,
      maxNetworkRetries: 2,
      depositWindowMs: 72 * 3_600_000,
      expiryJob: true,
      expiryIntervalMs: 60_000,
    });
  });

  it('uses the hosted API for a live key in production, or when told to', () => {
    const live = loadConfig({
      NODE_ENV: 'production',
      EVALON_SESSION_SECRET: 's'.repeat(32),
      EVALON_PAYMENTS_SECRET_KEY: 'sk_live_abc',
    });
    expect(live.payments.endpoint).toBeNull();
    expect(loadConfig({ EVALON_PAYMENTS_HOST: 'hosted' }).payments.endpoint).toBeNull();
    expect(
      loadConfig({ EVALON_PAYMENTS_HOST: 'payments.internal.example' }).payments.endpoint,
    ).toEqual({ host: 'payments.internal.example', port: 443, protocol: 'https' });
    expect(loadConfig({ EVALON_PAYMENTS_PORT: '4242' }).payments.endpoint?.port).toBe(4242);
  });

  it('refuses a live key outside production and a webhook secret of the wrong shape', () => {
    expect(() => loadConfig({ EVALON_PAYMENTS_SECRET_KEY: 'sk_live_abc' })).toThrow(ConfigError);
    expect(() => loadConfig({ EVALON_PAYMENTS_WEBHOOK_SECRET: 'secret' })).toThrow(
      /EVALON_PAYMENTS_WEBHOOK_SECRET: must start with whsec_/,
    );
    expect(() => loadConfig({ EVALON_DEPOSIT_EXPIRY_JOB: 'maybe' })).toThrow(/must be on or off/);
  });
});
