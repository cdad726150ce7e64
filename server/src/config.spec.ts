import path from 'node:path';
import { ConfigError, developmentSessionSecret, loadConfig } from './config';

describe('configuration', () => {
  it('has working defaults for one machine', () => {
    const c = loadConfig({});
    expect(c.http).toEqual({
      port: 8080,
      host: '127.0.0.1',
      publicUrl: 'http://127.0.0.1:8080',
      secureCookies: false,
      trustProxy: false,
    });
    expect(c.db).toMatchObject({
      host: '127.0.0.1',
      port: 3307,
      user: 'evalon',
      database: 'evalon',
    });
    expect(c.smtp).toMatchObject({
      host: '127.0.0.1',
      port: 1025,
      from: 'Evalon <no-reply@evalon.example>',
    });
    expect(c.google.authorizationUrl).toBe('http://127.0.0.1:8089/authorize');
    expect(c.session).toEqual({
      secret: developmentSessionSecret,
      idleTimeoutMs: 8 * 3_600_000,
      absoluteTimeoutMs: 7 * 24 * 3_600_000,
    });
    expect(c.loginLimits).toEqual({
      windowMs: 15 * 60_000,
      maxFailuresPerAccount: 5,
      maxFailuresPerIp: 20,
    });
    expect(c.webDist).toBe(path.resolve('dist/web/browser'));
  });

  it('treats an https public URL as behind a local proxy with Secure cookies', () => {
    const c = loadConfig({ EVALON_PUBLIC_URL: 'https://evalon.example/' });
    expect(c.http.publicUrl).toBe('https://evalon.example');
    expect(c.http.secureCookies).toBe(true);
    expect(c.http.trustProxy).toBe('loopback');
    expect(
      loadConfig({ EVALON_PUBLIC_URL: 'https://evalon.example', EVALON_TRUST_PROXY: '2' }).http
        .trustProxy,
    ).toBe(2);
  });

  it('fails fast naming every bad variable', () => {
    let error: unknown;
    try {
      loadConfig({
        EVALON_PORT: 'eighty',
        EVALON_DB_PORT: '70000',
        EVALON_PUBLIC_URL: 'evalon.example',
      });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(ConfigError);
    const message = (error as Error).message;
    expect(message).toMatch(/^Evalon cannot start: the configuration is not valid\./);
    expect(message).toContain('EVALON_PORT: must be a port number (got "eighty")');
    expect(message).toContain('EVALON_DB_PORT: must be between 0 and 65535 (got "70000")');
    expect(message).toContain(
      'EVALON_PUBLIC_URL: must be an http:// or https:// URL (got "evalon.example")',
    );
  });

  it('reads the visit and shipment settings, with 0 turning the alerts job off', () => {
    const d = loadConfig({});
    expect(d.visits).toEqual({ offerHours: 48, travelDayThresholdKm: 500 });
    expect(d.shipments.alertsIntervalMs).toBe(60_000);
    expect(d.shipments.carrier.baseUrl).toBe('http://127.0.0.1:12211');
    const c = loadConfig({
      EVALON_VISIT_OFFER_HOURS: '24',
      EVALON_SHIPMENT_ALERTS_INTERVAL_MS: '0',
      EVALON_CARRIER_PORT: '13000',
    });
    expect(c.visits.offerHours).toBe(24);
    expect(c.shipments.alertsIntervalMs).toBe(0);
    expect(c.shipments.carrier.baseUrl).toBe('http://127.0.0.1:13000');
    expect(() => loadConfig({ EVALON_SHIPMENT_ALERTS_INTERVAL_MS: '-5' })).toThrow(
      /EVALON_SHIPMENT_ALERTS_INTERVAL_MS/,
    );
  });

  it('points Google sign-in at the stand-in on EVALON_OAUTH_PORT unless URLs are given', () => {
    const moved = loadConfig({ EVALON_OAUTH_PORT: '8119' });
    expect(moved.google.authorizationUrl).toBe('http://127.0.0.1:8119/authorize');
    expect(moved.google.tokenUrl).toBe('http://127.0.0.1:8119/token');
    expect(moved.google.userInfoUrl).toBe('http://127.0.0.1:8119/userinfo');
    const explicit = loadConfig({
      EVALON_OAUTH_PORT: '8119',
      EVALON_GOOGLE_TOKEN_URL: 'https://oauth2.example/token',
    });
    expect(explicit.google.tokenUrl).toBe('https://oauth2.example/token');
    expect(() => loadConfig({ EVALON_GOOGLE_AUTH_URL: 'ftp://x' })).toThrow(
      /EVALON_GOOGLE_AUTH_URL/,
    );
  });

  it('refuses the development session secret in production', () => {
    expect(() => loadConfig({ NODE_ENV: 'production' })).toThrow(/EVALON_SESSION_SECRET/);
    expect(loadConfig({ NODE_ENV: 'production', EVALON_SESSION_SECRET: 'x'.repeat(32) }).env).toBe(
      'production',
    );
  });

  it('treats empty variables as unset', () => {
    const c = loadConfig({ EVALON_PORT: '', EVALON_SMTP_PORT: ' ' });
    expect(c.http.port).toBe(8080);
    expect(c.smtp.port).toBe(1025);
  });
});
