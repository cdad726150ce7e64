// The carrier stand-in run as its own process (`node server.mjs` on a free port), with a small receiving server that checks
// every webhook's signature independently (Node's HMAC-SHA256; the scheme is the one written in
// docs/carrier-standin.md: v1 = HMAC-SHA256(secret, "<t>.<raw body>")).
import { spawn, spawnSync } from 'node:child_process';
import crypto from 'node:crypto';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';

jest.setTimeout(20_000);

const SECRET = 'carrier_whsec_spec';
const KEY = 'carrier_key_spec';

interface Received {
  id: string;
  data: { trackingNumber: string; status: string; sequence: number; detail: string | null };
  valid: boolean;
}

/** A receiver that answers `answer()` and keeps every delivery with its signature check. */
async function receiver(answer: () => number = () => 200) {
  const received: Received[] = [];
  const server = http.createServer((req, res) => {
    let body = '';
    req.on('data', (c) => (body += c));
    req.on('end', () => {
      const header = String(req.headers['carrier-signature'] ?? '');
      const parts = Object.fromEntries(header.split(',').map((p) => p.split('=')));
      const expected = crypto
        .createHmac('sha256', SECRET)
        .update(`${parts.t}.${body}`)
        .digest('hex');
      const parsed = JSON.parse(body);
      received.push({ ...parsed, valid: parts.v1 === expected });
      res.statusCode = answer();
      res.end('ok');
    });
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}/hook`;
  return { received, url, close: () => new Promise((r) => server.close(r)) };
}

/** Starts `node server.mjs` on a free port (no automatic steps, no chaos unless asked). */
async function start(webhookUrl: string | null, chaos: Record<string, unknown> = {}) {
  const child = spawn(process.execPath, [path.join(__dirname, 'server.mjs')], {
    env: {
      ...process.env,
      EVALON_CARRIER_PORT: '0',
      EVALON_CARRIER_WEBHOOK_URL: webhookUrl ?? 'none',
      EVALON_CARRIER_WEBHOOK_SECRET: SECRET,
      EVALON_CARRIER_API_KEY: KEY,
      EVALON_CARRIER_WEBHOOK_RETRY_BASE_MS: '20',
      EVALON_CARRIER_WEBHOOK_RETRY_MAX_MS: '80',
      EVALON_CARRIER_WEBHOOK_MAX_ATTEMPTS: '6',
      EVALON_CARRIER_STEP_MS: '0',
      EVALON_CARRIER_DUPLICATE_RATE: '0',
      EVALON_CARRIER_SHUFFLE_MS: '0',
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const url = await new Promise<string>((resolve, reject) => {
    let out = '';
    child.stdout!.on('data', (c: Buffer) => {
      out += c.toString();
      const m = /listening on (http:\/\/127\.0\.0\.1:\d+)/.exec(out);
      if (m) resolve(m[1]);
    });
    child.stderr!.on('data', (c: Buffer) => (out += c.toString()));
    child.once('exit', (code) => reject(new Error(`exited ${code}: ${out}`)));
  });
  const fake = {
    close: () =>
      new Promise<void>((resolve) => {
        if (child.exitCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill('SIGTERM');
      }),
  };
  const call = async (method: string, path: string, body?: unknown, headers = {}) => {
    const res = await fetch(url + path, {
      method,
      headers: {
        'content-type': 'application/json',
        authorization: `Bearer ${KEY}`,
        ...headers,
      },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    return { status: res.status, body: await res.json() };
  };
  if (Object.keys(chaos).length > 0) await call('POST', '/__fake/faults', chaos);
  return { fake, url, call };
}

const booking = {
  reference: 'SHP-1',
  service: 'standard',
  shipFrom: { country: 'DE', postalCode: '10115' },
  shipTo: { country: 'DE', postalCode: '80331' },
  parcels: [{ reference: '106141411234567897', weightGrams: 12000 }],
  autoAdvance: false,
};

describe('carrier stand-in', () => {
  it('books with a bearer key, answers the same booking for a reused idempotency key', async () => {
    const { fake, call } = await start(null);
    try {
      expect(
        (await call('POST', '/v1/shipments', booking, { authorization: 'Bearer x' })).status,
      ).toBe(401);
      const a = await call('POST', '/v1/shipments', booking, { 'idempotency-key': 'k1' });
      expect(a.status).toBe(201);
      expect(a.body.trackingNumber).toMatch(/^WP\d{10}$/);
      expect(a.body.status).toBe('booked');
      const b = await call('POST', '/v1/shipments', booking, { 'idempotency-key': 'k1' });
      expect(b.body.trackingNumber).toBe(a.body.trackingNumber);
      const c = await call(
        'POST',
        '/v1/shipments',
        { ...booking, reference: 'X' },
        {
          'idempotency-key': 'k1',
        },
      );
      expect(c.status).toBe(409);
      expect((await call('POST', '/v1/shipments', { ...booking, service: 'rocket' })).status).toBe(
        400,
      );
      expect((await call('GET', `/v1/shipments/${a.body.trackingNumber}`)).body.status).toBe(
        'booked',
      );
    } finally {
      await fake.close();
    }
  });

  it('pushes signed events for every rung climbed, in sequence, retrying a failing endpoint', async () => {
    let failures = 2;
    const hook = await receiver(() => (failures-- > 0 ? 500 : 200));
    const { fake, call } = await start(hook.url);
    try {
      const { body } = await call('POST', '/v1/shipments', booking);
      const tn = body.trackingNumber;
      const moved = await call('POST', `/__fake/shipments/${tn}/advance`, { to: 'delivered' });
      expect(moved.body.emitted).toBe(4);
      const flushed = await call('POST', '/__fake/webhooks/flush', {});
      expect(flushed.body).toMatchObject({ settled: true, failed: 0 });
      const ok = hook.received.filter((r) => r.valid);
      expect(ok).toHaveLength(hook.received.length);
      // Two answers were 500: the first event was attempted three times in all.
      expect(hook.received.length).toBe(6);
      const statuses = [...new Set(hook.received.map((r) => r.data.status))];
      expect(statuses.sort()).toEqual(['delivered', 'in_transit', 'out_for_delivery', 'picked_up']);
      // Moving a delivered parcel on emits nothing more.
      expect((await call('POST', `/__fake/shipments/${tn}/advance`, {})).body.emitted).toBe(0);
    } finally {
      await fake.close();
      await hook.close();
    }
  });

  it('delays and loses parcels as exception events; a lost parcel no longer moves', async () => {
    const hook = await receiver();
    const { fake, call } = await start(hook.url);
    try {
      const tn = (await call('POST', '/v1/shipments', booking)).body.trackingNumber;
      const before = (await call('GET', `/v1/shipments/${tn}`)).body.estimatedDelivery;
      const delayed = await call('POST', `/__fake/shipments/${tn}/delay`, { days: 2 });
      const shift = Date.parse(delayed.body.parcel.estimatedDelivery) - Date.parse(before);
      expect(shift).toBe(2 * 86_400_000);
      await call('POST', `/__fake/shipments/${tn}/lose`, {});
      expect((await call('POST', `/__fake/shipments/${tn}/advance`, {})).status).toBe(409);
      await call('POST', '/__fake/webhooks/flush', {});
      expect(hook.received.map((r) => r.data.detail)).toEqual(['delayed', 'lost']);
    } finally {
      await fake.close();
      await hook.close();
    }
  });

  it('replays a parcel’s events several times in a shuffled order, and duplicates under chaos', async () => {
    const hook = await receiver();
    const { fake, call } = await start(hook.url, { rngStart: 7 });
    try {
      const tn = (await call('POST', '/v1/shipments', booking)).body.trackingNumber;
      await call('POST', `/__fake/shipments/${tn}/advance`, { to: 'delivered' });
      await call('POST', '/__fake/webhooks/flush', {});
      expect(hook.received).toHaveLength(4);
      expect((await call('POST', `/__fake/shipments/${tn}/replay`, { times: 5 })).body.queued).toBe(
        20,
      );
      await call('POST', '/__fake/webhooks/flush', {});
      const replayed = hook.received.slice(4).map((r) => r.data.sequence);
      expect(replayed).toHaveLength(20);
      // Not in sequence order any more (seeded shuffle, so this is repeatable).
      expect(replayed).not.toEqual([...replayed].sort((a, b) => a - b));

      await call('POST', '/__fake/faults', { duplicateRate: 1 });
      const tn2 = (await call('POST', '/v1/shipments', { ...booking, reference: 'SHP-2' })).body
        .trackingNumber;
      await call('POST', `/__fake/shipments/${tn2}/advance`, {});
      await call('POST', '/__fake/webhooks/flush', {});
      const ids = hook.received.filter((r) => r.data.trackingNumber === tn2).map((r) => r.id);
      expect(ids).toHaveLength(2);
      expect(ids[0]).toBe(ids[1]);
    } finally {
      await fake.close();
      await hook.close();
    }
  });

  it('goes down: the API answers 503 and webhooks wait until it is back', async () => {
    const hook = await receiver();
    const { fake, call } = await start(hook.url);
    try {
      const tn = (await call('POST', '/v1/shipments', booking)).body.trackingNumber;
      await call('POST', '/__fake/faults', { down: true });
      expect((await call('GET', `/v1/shipments/${tn}`)).status).toBe(503);
      await call('POST', `/__fake/shipments/${tn}/advance`, {});
      await new Promise((r) => setTimeout(r, 200));
      expect(hook.received).toHaveLength(0);
      await call('POST', '/__fake/faults', { down: false });
      await call('POST', '/__fake/webhooks/flush', {});
      expect(hook.received.map((r) => r.data.status)).toEqual(['picked_up']);
    } finally {
      await fake.close();
      await hook.close();
    }
  });

  it('reads its port and endpoint from the environment', () => {
    const read = (env: Record<string, string>) => {
      const script =
        "import {configFromEnv} from './config.mjs';" +
        'try { console.log(JSON.stringify(configFromEnv(JSON.parse(process.argv[1])))); }' +
        'catch (e) { console.log(JSON.stringify({ error: e.message })); }';
      const out = spawnSync(
        process.execPath,
        ['--input-type=module', '-e', script, JSON.stringify(env)],
        {
          cwd: __dirname,
          encoding: 'utf8',
        },
      );
      return JSON.parse(out.stdout);
    };
    const c = read({ EVALON_CARRIER_PORT: '12251', EVALON_PORT: '8120' });
    expect(c.port).toBe(12251);
    expect(c.options.webhookUrl).toBe('http://127.0.0.1:8120/api/webhooks/carrier');
    expect(read({}).port).toBe(12211);
    expect(read({ EVALON_CARRIER_PORT: 'x' }).error).toMatch(/EVALON_CARRIER_PORT/);
    expect(read({ EVALON_CARRIER_WEBHOOK_URL: 'none' }).options.webhookUrl).toBeNull();
  });
});
