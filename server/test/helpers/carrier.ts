import { spawn } from 'node:child_process';
import path from 'node:path';

const repoRoot = path.resolve(__dirname, '..', '..', '..');

/** The secret the test apps verify carrier webhooks with (the server's default). */
export const carrierWebhookSecret = 'carrier_whsec_evalon_local';

/** The carrier stand-in (infra/fakes/carrier) running as a child process on a free port. */
export interface RunningCarrier {
  base: string;
  /** Calls the control API (`/__fake/...`). */
  control<T = unknown>(method: string, route: string, body?: unknown): Promise<T>;
  stop(): Promise<void>;
}

/**
 * Starts `node infra/fakes/carrier/server.mjs` on a free port with no automatic steps and no
 * chaos (a test switches those on through the control API), quick retries, and points
 * `EVALON_CARRIER_URL` of this test process at it so the app under test books there.
 */
export function startCarrier(env: Record<string, string> = {}): Promise<RunningCarrier> {
  const child = spawn(process.execPath, [path.join(repoRoot, 'infra/fakes/carrier/server.mjs')], {
    cwd: repoRoot,
    env: {
      ...process.env,
      EVALON_CARRIER_PORT: '0',
      EVALON_CARRIER_WEBHOOK_URL: 'none',
      EVALON_CARRIER_STEP_MS: '0',
      EVALON_CARRIER_DUPLICATE_RATE: '0',
      EVALON_CARRIER_SHUFFLE_MS: '0',
      EVALON_CARRIER_WEBHOOK_RETRY_BASE_MS: '50',
      EVALON_CARRIER_WEBHOOK_RETRY_MAX_MS: '500',
      ...env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const stop = () =>
    new Promise<void>((resolve) => {
      if (child.exitCode !== null || child.signalCode !== null) return resolve();
      child.once('exit', () => resolve());
      child.kill('SIGTERM');
      setTimeout(() => child.kill('SIGKILL'), 3_000).unref();
    });
  return new Promise((resolve, reject) => {
    let output = '';
    child.stdout!.on('data', (c: Buffer) => {
      output += c.toString();
      const m = /listening on (http:\/\/127\.0\.0\.1:\d+)/.exec(output);
      if (!m) return;
      const base = m[1];
      process.env.EVALON_CARRIER_URL = base;
      resolve({
        base,
        stop,
        async control<T>(method: string, route: string, body?: unknown): Promise<T> {
          const res = await fetch(`${base}/__fake${route}`, {
            method,
            headers: { 'content-type': 'application/json' },
            body: body === undefined ? undefined : JSON.stringify(body),
          });
          return (await res.json()) as T;
        },
      });
    });
    child.stderr!.on('data', (c: Buffer) => (output += c.toString()));
    child.once('exit', (code) => reject(new Error(`carrier stand-in exited (${code}): ${output}`)));
  });
}
