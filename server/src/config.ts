import path from 'node:path';
import { z } from 'zod';

/** The development session secret; refused when NODE_ENV is `production`. */
export const developmentSessionSecret = 'evalon-development-session-secret-not-for-production';

/** Treats an empty variable like a missing one, so `EVALON_PORT=` falls back to the default. */
const blankAsMissing = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);

const str = (fallback: string) => z.preprocess(blankAsMissing, z.string().default(fallback));
const port = (fallback: number) =>
  z.preprocess(
    blankAsMissing,
    z.coerce
      .number({ error: 'must be a port number' })
      .int('must be a whole number')
      .min(0, 'must be between 0 and 65535')
      .max(65535, 'must be between 0 and 65535')
      .default(fallback),
  );
const positive = (fallback: number) =>
  z.preprocess(
    blankAsMissing,
    z.coerce
      .number({ error: 'must be a number' })
      .int('must be a whole number')
      .positive('must be greater than 0')
      .default(fallback),
  );
const isHttpUrl = (v: string) => /^https?:\/\/[^/\s]+/i.test(v) && URL.canParse(v);
const urlMessage = { message: 'must be an http:// or https:// URL' };
const url = (fallback: string) =>
  z.preprocess(blankAsMissing, z.string().default(fallback).refine(isHttpUrl, urlMessage));
const optionalUrl = () =>
  z.preprocess(blankAsMissing, z.string().refine(isHttpUrl, urlMessage).optional());

/** Every environment variable the server reads, with its default. */
const envSchema = z.object({
  NODE_ENV: z.preprocess(
    blankAsMissing,
    z.enum(['development', 'test', 'production']).default('development'),
  ),
  EVALON_PORT: port(8080),
  EVALON_HOST: str('127.0.0.1'),
  EVALON_PUBLIC_URL: url('http://127.0.0.1:8080'),
  EVALON_TRUST_PROXY: z.preprocess(blankAsMissing, z.string().optional()),
  EVALON_LOG_LEVEL: z.preprocess(
    blankAsMissing,
    z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  ),
  EVALON_DB_HOST: str('127.0.0.1'),
  EVALON_DB_PORT: port(3307),
  EVALON_DB_USER: str('evalon'),
  EVALON_DB_PASSWORD: str('evalon-local'),
  EVALON_DB_NAME: str('evalon'),
  EVALON_DB_POOL_SIZE: positive(10),
  EVALON_SMTP_HOST: str('127.0.0.1'),
  EVALON_SMTP_PORT: port(1025),
  EVALON_SMTP_SECURE: z.preprocess(blankAsMissing, z.stringbool().default(false)),
  EVALON_SMTP_USER: z.preprocess(blankAsMissing, z.string().optional()),
  EVALON_SMTP_PASSWORD: z.preprocess(blankAsMissing, z.string().optional()),
  EVALON_MAIL_FROM: str('Evalon <no-reply@evalon.example>'),
  EVALON_SESSION_SECRET: z.preprocess(
    blankAsMissing,
    z.string().min(16, 'must be at least 16 characters').default(developmentSessionSecret),
  ),
  EVALON_SESSION_IDLE_MINUTES: positive(8 * 60),
  EVALON_SESSION_ABSOLUTE_HOURS: positive(7 * 24),
  EVALON_LOGIN_WINDOW_MINUTES: positive(15),
  EVALON_LOGIN_MAX_FAILURES_PER_ACCOUNT: positive(5),
  EVALON_LOGIN_MAX_FAILURES_PER_IP: positive(20),
  EVALON_GOOGLE_CLIENT_ID: str('evalon-local-client'),
  EVALON_GOOGLE_CLIENT_SECRET: str('evalon-local-secret'),
  // Without explicit URLs the sign-in stand-in on EVALON_OAUTH_PORT answers, the port the
  // start and test scripts give it (a second checkout runs its stand-ins on other ports).
  EVALON_OAUTH_PORT: port(8089),
  EVALON_GOOGLE_AUTH_URL: optionalUrl(),
  EVALON_GOOGLE_TOKEN_URL: optionalUrl(),
  EVALON_GOOGLE_USERINFO_URL: optionalUrl(),
  EVALON_WEB_DIST: str('dist/web/browser'),
  EVALON_ROOT: z.preprocess(blankAsMissing, z.string().optional()),
  EVALON_UPLOAD_DIR: str('.data/uploads'),
  EVALON_DOCUMENT_DIR: str('.data/uploads/documents'),
  EVALON_CREDENTIAL_DIR: str('.data/uploads/credentials'),
  EVALON_MAPS_API_KEY: z.preprocess(blankAsMissing, z.string().optional()),
  EVALON_MAPS_SCRIPT_URL: str('https://maps.googleapis.com/maps/api/js'),
  EVALON_OUTBOX_WORKER: z.preprocess(
    blankAsMissing,
    z.enum(['on', 'off'], { error: 'must be on or off' }).default('on'),
  ),
  EVALON_OUTBOX_POLL_MS: positive(500),
  EVALON_OUTBOX_BATCH_SIZE: positive(10),
  EVALON_OUTBOX_MAX_ATTEMPTS: positive(8),
  EVALON_OUTBOX_BACKOFF_BASE_MS: positive(2_000),
  EVALON_OUTBOX_BACKOFF_CAP_MS: positive(15 * 60_000),
  EVALON_OUTBOX_LEASE_MS: positive(5 * 60_000),
  EVALON_SMTP_TIMEOUT_MS: positive(30_000),
  EVALON_PAYMENTS_SECRET_KEY: str('sk_test_evalon_local'),
  EVALON_PAYMENTS_HOST: z.preprocess(blankAsMissing, z.string().optional()),
  EVALON_PAYMENTS_PORT: z.preprocess(
    blankAsMissing,
    z.coerce
      .number({ error: 'must be a port number' })
      .int('must be a whole number')
      .min(1, 'must be between 1 and 65535')
      .max(65535, 'must be between 1 and 65535')
      .optional(),
  ),
  EVALON_PAYMENTS_PROTOCOL: z.preprocess(
    blankAsMissing,
    z.enum(['http', 'https'], { error: 'must be http or https' }).optional(),
  ),
  EVALON_PAYMENTS_WEBHOOK_SECRET: z.preprocess(
    blankAsMissing,
    z.string().startsWith('whsec_', 'must start with whsec_').default('whsec_evalon_local'),
  ),
  EVALON_PAYMENTS_TIMEOUT_MS: positive(20_000),
  EVALON_DEPOSIT_WINDOW_HOURS: positive(72),
  EVALON_DEPOSIT_EXPIRY_JOB: z.preprocess(
    blankAsMissing,
    z.enum(['on', 'off'], { error: 'must be on or off' }).default('on'),
  ),
  EVALON_DEPOSIT_EXPIRY_INTERVAL_MS: positive(60_000),
  EVALON_VISIT_OFFER_HOURS: positive(48),
  EVALON_VISIT_TRAVEL_DAY_KM: positive(500),
  EVALON_CARRIER_PORT: port(12211),
  EVALON_CARRIER_URL: z.preprocess(blankAsMissing, z.string().optional()),
  EVALON_CARRIER_API_KEY: str('carrier_key_evalon_local'),
  EVALON_CARRIER_WEBHOOK_SECRET: str('carrier_whsec_evalon_local'),
  EVALON_CARRIER_TIMEOUT_MS: positive(10_000),
  // 0 turns the shipment alerts job off (test servers whose suites count e-mails).
  EVALON_SHIPMENT_ALERTS_INTERVAL_MS: z.preprocess(
    blankAsMissing,
    z.coerce
      .number({ error: 'must be a number' })
      .int('must be a whole number')
      .min(0, 'must be 0 (off) or more')
      .default(60_000),
  ),
});

/** Settings of the whole server, read once from the environment. */
export interface Config {
  env: 'development' | 'test' | 'production';
  http: {
    port: number;
    host: string;
    /** Origin and base of every link we send out, e.g. `http://127.0.0.1:8080`. */
    publicUrl: string;
    /** Whether the public URL is https (cookies then carry `Secure`). */
    secureCookies: boolean;
    /** Express `trust proxy` value (false, a hop count, or a list such as `loopback`). */
    trustProxy: boolean | number | string;
  };
  logLevel: 'fatal' | 'error' | 'warn' | 'info' | 'debug' | 'trace' | 'silent';
  db: {
    host: string;
    port: number;
    user: string;
    password: string;
    database: string;
    poolSize: number;
  };
  smtp: {
    host: string;
    port: number;
    /** Whether to speak TLS from the first byte (port 465 style). */
    secure: boolean;
    user?: string;
    password?: string;
    from: string;
  };
  session: {
    secret: string;
    idleTimeoutMs: number;
    absoluteTimeoutMs: number;
  };
  loginLimits: {
    windowMs: number;
    maxFailuresPerAccount: number;
    maxFailuresPerIp: number;
  };
  google: {
    clientId: string;
    clientSecret: string;
    authorizationUrl: string;
    tokenUrl: string;
    userInfoUrl: string;
  };
  /** Absolute path of the built Angular app (may not exist). */
  webDist: string;
  /** The repository (or install) folder relative paths are read from: `EVALON_ROOT`, else the working directory. */
  rootDir: string;
  /** Where uploaded files live (absolute folders, outside the web root). */
  storage: {
    /** Model photos: `EVALON_UPLOAD_DIR`, default `.data/uploads`. */
    photoDir: string;
    /** Loan documents: `EVALON_DOCUMENT_DIR`, default `.data/uploads/documents`. */
    documentDir: string;
    /** Proctors' credential PDFs: `EVALON_CREDENTIAL_DIR`, default `.data/uploads/credentials`. */
    credentialDir: string;
  };
  /** The maps script: a browser key for the hosted loader, or null for the offline stand-in. */
  maps: {
    apiKey: string | null;
    /** The hosted loader URL used when a key is set (`EVALON_MAPS_SCRIPT_URL`). */
    hostedScriptUrl: string;
  };
  /** The e-mail outbox worker (see docs/decisions/0003-outbox.md). */
  outbox: {
    /** Whether this process drains the outbox (several processes may). */
    worker: boolean;
    /** Pause between polls when the outbox had nothing due. */
    pollIntervalMs: number;
    /** Messages claimed per short claiming transaction. */
    batchSize: number;
    /** Send attempts before a message is parked for an admin. */
    maxAttempts: number;
    /** First retry delay; it doubles per attempt (with jitter) up to `backoffCapMs`. */
    backoffBaseMs: number;
    /** Largest retry delay ceiling (15 minutes by default). */
    backoffCapMs: number;
    /** How long a claimed message stays reserved for its worker before others may reclaim it. */
    leaseMs: number;
    /** Longest a single SMTP exchange may take (connection, greeting and socket inactivity). */
    smtpTimeoutMs: number;
  };
  /** The payment provider (its official SDK) and the deposit rules around it. */
  payments: PaymentsConfig;
  /** Proctoring visits: how long an offer waits, when a proctor needs travel days. */
  visits: {
    /** Hours a proctor has to answer an offer (`EVALON_VISIT_OFFER_HOURS`, default 48). */
    offerHours: number;
    /** Great-circle distance above which a travel day goes before and after (default 500 km). */
    travelDayThresholdKm: number;
  };
  /** Shipments: the carrier adapter and the alerts job. */
  shipments: {
    /** Pause between alert runs; 0 turns the job off (`EVALON_SHIPMENT_ALERTS_INTERVAL_MS`). */
    alertsIntervalMs: number;
    carrier: {
      /** The carrier API (`EVALON_CARRIER_URL`, default the local stand-in on `EVALON_CARRIER_PORT`). */
      baseUrl: string;
      apiKey: string;
      webhookSecret: string;
      timeoutMs: number;
    };
  };
}

/** Settings of the payments component (the decisions are in the JsDoc of `payments/domain`). */
export interface PaymentsConfig {
  /** The provider's secret API key; `sk_test_…` keys go to the local fake unless told otherwise. */
  secretKey: string;
  /**
   * Where the SDK sends requests instead of the provider's hosted API, or null for the hosted
   * API itself (a live key with no `EVALON_PAYMENTS_HOST`, or `EVALON_PAYMENTS_HOST=hosted`).
   */
  endpoint: { host: string; port: number; protocol: 'http' | 'https' } | null;
  /** Signing secret of our webhook endpoint (`whsec_…`). */
  webhookSecret: string;
  /** Longest one SDK request may take before it is retried or given up. */
  timeoutMs: number;
  /** Automatic retries of a failed SDK request (with the same idempotency key). */
  maxNetworkRetries: number;
  /** Time the buyer has after approval to secure the deposit (capped by the ship-by day). */
  depositWindowMs: number;
  /** Whether this process runs the expiry job (several processes may). */
  expiryJob: boolean;
  /** Pause between runs of the expiry job. */
  expiryIntervalMs: number;
}

/**
 * Where the SDK should send requests. An explicit `EVALON_PAYMENTS_HOST` wins (`hosted` means
 * the provider's own API); otherwise live keys use the hosted API and any other key the local
 * payments fake on 127.0.0.1:12111, so a developer can never send a test request to the hosted
 * API by accident, nor a live one to the fake.
 */
function paymentsEndpoint(e: {
  EVALON_PAYMENTS_SECRET_KEY: string;
  EVALON_PAYMENTS_HOST?: string;
  EVALON_PAYMENTS_PORT?: number;
  EVALON_PAYMENTS_PROTOCOL?: 'http' | 'https';
}): PaymentsConfig['endpoint'] {
  const host = e.EVALON_PAYMENTS_HOST?.trim();
  const live = /^(sk|rk)_live_/.test(e.EVALON_PAYMENTS_SECRET_KEY);
  if (host === 'hosted' || (host === undefined && live)) return null;
  const resolvedHost = host ?? '127.0.0.1';
  const loopback = /^(127\.\d+\.\d+\.\d+|localhost|\[?::1\]?)$/.test(resolvedHost);
  const protocol = e.EVALON_PAYMENTS_PROTOCOL ?? (loopback ? 'http' : 'https');
  return {
    host: resolvedHost,
    port: e.EVALON_PAYMENTS_PORT ?? (loopback ? 12111 : protocol === 'https' ? 443 : 80),
    protocol,
  };
}

/** Thrown when the environment holds a value the server cannot use; the message lists each one. */
export class ConfigError extends Error {
  constructor(readonly problems: string[]) {
    super(
      `Evalon cannot start: the configuration is not valid.\n${problems.map((p) => `  - ${p}`).join('\n')}`,
    );
    this.name = 'ConfigError';
  }
}

function parseTrustProxy(raw: string | undefined, https: boolean): boolean | number | string {
  // Behind https we expect a reverse proxy on the same machine; plain http means no proxy.
  if (raw === undefined) return https ? 'loopback' : false;
  if (/^(true|false)$/i.test(raw)) return raw.toLowerCase() === 'true';
  if (/^\d+$/.test(raw)) return Number(raw);
  return raw;
}

/**
 * Reads and checks the configuration. Throws {@link ConfigError} naming every bad variable,
 * so a wrong setting stops the server at start-up rather than at the first request.
 */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    throw new ConfigError(
      parsed.error.issues.map((issue) => {
        const name = issue.path.join('.');
        const value = env[name];
        return `${name}: ${issue.message}${value === undefined ? '' : ` (got "${value}")`}`;
      }),
    );
  }
  const e = parsed.data;
  const oauthStandIn = `http://127.0.0.1:${e.EVALON_OAUTH_PORT}`;
  const problems: string[] = [];
  if (e.NODE_ENV === 'production' && e.EVALON_SESSION_SECRET === developmentSessionSecret) {
    problems.push('EVALON_SESSION_SECRET: set a secret of your own in production');
  }
  // One SMTP exchange can spend a timeout on the connection, the greeting and the socket: the
  // lease must outlast that, or a live worker's message could be reclaimed and sent twice.
  if (e.EVALON_OUTBOX_LEASE_MS < 4 * e.EVALON_SMTP_TIMEOUT_MS) {
    problems.push('EVALON_OUTBOX_LEASE_MS: must be at least 4 times EVALON_SMTP_TIMEOUT_MS');
  }
  if (/^(sk|rk)_live_/.test(e.EVALON_PAYMENTS_SECRET_KEY) && e.NODE_ENV !== 'production') {
    problems.push('EVALON_PAYMENTS_SECRET_KEY: a live key is accepted in production only');
  }
  if (e.EVALON_OUTBOX_BACKOFF_CAP_MS < e.EVALON_OUTBOX_BACKOFF_BASE_MS) {
    problems.push('EVALON_OUTBOX_BACKOFF_CAP_MS: must not be below EVALON_OUTBOX_BACKOFF_BASE_MS');
  }
  if (problems.length) throw new ConfigError(problems);

  const publicUrl = e.EVALON_PUBLIC_URL.replace(/\/+$/, '');
  const rootDir = e.EVALON_ROOT ?? process.cwd();
  const https = publicUrl.toLowerCase().startsWith('https://');
  return {
    env: e.NODE_ENV,
    http: {
      port: e.EVALON_PORT,
      host: e.EVALON_HOST,
      publicUrl,
      secureCookies: https,
      trustProxy: parseTrustProxy(e.EVALON_TRUST_PROXY, https),
    },
    logLevel: e.EVALON_LOG_LEVEL,
    db: {
      host: e.EVALON_DB_HOST,
      port: e.EVALON_DB_PORT,
      user: e.EVALON_DB_USER,
      password: e.EVALON_DB_PASSWORD,
      database: e.EVALON_DB_NAME,
      poolSize: e.EVALON_DB_POOL_SIZE,
    },
    smtp: {
      host: e.EVALON_SMTP_HOST,
      port: e.EVALON_SMTP_PORT,
      secure: e.EVALON_SMTP_SECURE,
      user: e.EVALON_SMTP_USER,
      password: e.EVALON_SMTP_PASSWORD,
      from: e.EVALON_MAIL_FROM,
    },
    session: {
      secret: e.EVALON_SESSION_SECRET,
      idleTimeoutMs: e.EVALON_SESSION_IDLE_MINUTES * 60_000,
      absoluteTimeoutMs: e.EVALON_SESSION_ABSOLUTE_HOURS * 3_600_000,
    },
    loginLimits: {
      windowMs: e.EVALON_LOGIN_WINDOW_MINUTES * 60_000,
      maxFailuresPerAccount: e.EVALON_LOGIN_MAX_FAILURES_PER_ACCOUNT,
      maxFailuresPerIp: e.EVALON_LOGIN_MAX_FAILURES_PER_IP,
    },
    google: {
      clientId: e.EVALON_GOOGLE_CLIENT_ID,
      clientSecret: e.EVALON_GOOGLE_CLIENT_SECRET,
      authorizationUrl: e.EVALON_GOOGLE_AUTH_URL ?? `${oauthStandIn}/authorize`,
      tokenUrl: e.EVALON_GOOGLE_TOKEN_URL ?? `${oauthStandIn}/token`,
      userInfoUrl: e.EVALON_GOOGLE_USERINFO_URL ?? `${oauthStandIn}/userinfo`,
    },
    webDist: path.resolve(process.cwd(), e.EVALON_WEB_DIST),
    rootDir,
    storage: {
      photoDir: path.resolve(rootDir, e.EVALON_UPLOAD_DIR),
      documentDir: path.resolve(rootDir, e.EVALON_DOCUMENT_DIR),
      credentialDir: path.resolve(rootDir, e.EVALON_CREDENTIAL_DIR),
    },
    maps: { apiKey: e.EVALON_MAPS_API_KEY ?? null, hostedScriptUrl: e.EVALON_MAPS_SCRIPT_URL },
    outbox: {
      worker: e.EVALON_OUTBOX_WORKER === 'on',
      pollIntervalMs: e.EVALON_OUTBOX_POLL_MS,
      batchSize: e.EVALON_OUTBOX_BATCH_SIZE,
      maxAttempts: e.EVALON_OUTBOX_MAX_ATTEMPTS,
      backoffBaseMs: e.EVALON_OUTBOX_BACKOFF_BASE_MS,
      backoffCapMs: e.EVALON_OUTBOX_BACKOFF_CAP_MS,
      leaseMs: e.EVALON_OUTBOX_LEASE_MS,
      smtpTimeoutMs: e.EVALON_SMTP_TIMEOUT_MS,
    },
    payments: {
      secretKey: e.EVALON_PAYMENTS_SECRET_KEY,
      endpoint: paymentsEndpoint(e),
      webhookSecret: e.EVALON_PAYMENTS_WEBHOOK_SECRET,
      timeoutMs: e.EVALON_PAYMENTS_TIMEOUT_MS,
      maxNetworkRetries: 2,
      depositWindowMs: e.EVALON_DEPOSIT_WINDOW_HOURS * 3_600_000,
      expiryJob: e.EVALON_DEPOSIT_EXPIRY_JOB === 'on',
      expiryIntervalMs: e.EVALON_DEPOSIT_EXPIRY_INTERVAL_MS,
    },
    visits: {
      offerHours: e.EVALON_VISIT_OFFER_HOURS,
      travelDayThresholdKm: e.EVALON_VISIT_TRAVEL_DAY_KM,
    },
    shipments: {
      alertsIntervalMs: e.EVALON_SHIPMENT_ALERTS_INTERVAL_MS,
      carrier: {
        baseUrl: e.EVALON_CARRIER_URL ?? `http://127.0.0.1:${e.EVALON_CARRIER_PORT}`,
        apiKey: e.EVALON_CARRIER_API_KEY,
        webhookSecret: e.EVALON_CARRIER_WEBHOOK_SECRET,
        timeoutMs: e.EVALON_CARRIER_TIMEOUT_MS,
      },
    },
  };
}
