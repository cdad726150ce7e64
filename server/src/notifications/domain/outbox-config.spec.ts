import { ConfigError, loadConfig } from '../../config';
import { messageIdDomain, messageIdHeader } from './outbox-worker';

describe('outbox configuration', () => {
  it('has defaults: worker on, 500 ms poll, batches of 10, 8 attempts, 2 s doubling to 15 min', () => {
    expect(loadConfig({}).outbox).toEqual({
      worker: true,
      pollIntervalMs: 500,
      batchSize: 10,
      maxAttempts: 8,
      backoffBaseMs: 2_000,
      backoffCapMs: 900_000,
      leaseMs: 300_000,
      smtpTimeoutMs: 30_000,
    });
    expect(loadConfig({ EVALON_OUTBOX_WORKER: 'off' }).outbox.worker).toBe(false);
  });

  it('refuses a lease that one slow SMTP exchange could outlast, and other bad values', () => {
    expect(() => loadConfig({ EVALON_OUTBOX_LEASE_MS: '60000' })).toThrow(
      /EVALON_OUTBOX_LEASE_MS: must be at least 4 times EVALON_SMTP_TIMEOUT_MS/,
    );
    expect(() => loadConfig({ EVALON_OUTBOX_BACKOFF_CAP_MS: '1000' })).toThrow(ConfigError);
    expect(() => loadConfig({ EVALON_OUTBOX_WORKER: 'maybe' })).toThrow(
      /EVALON_OUTBOX_WORKER: must be on or off/,
    );
    expect(() => loadConfig({ EVALON_OUTBOX_BATCH_SIZE: '0' })).toThrow(ConfigError);
  });
});

describe('Message-ID', () => {
  it('takes the domain of the From address, so ids look like <uuid@evalon.example>', () => {
    expect(messageIdDomain('Evalon <no-reply@evalon.example>')).toBe('evalon.example');
    expect(messageIdDomain('no-reply@Mail.Evalon.Example')).toBe('mail.evalon.example');
    expect(messageIdHeader('5b1f0b8e-2d0c-4b8e-9a51-0c7a3f1e2d44', 'evalon.example')).toBe(
      '<5b1f0b8e-2d0c-4b8e-9a51-0c7a3f1e2d44@evalon.example>',
    );
  });
});
