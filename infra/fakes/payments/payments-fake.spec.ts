// The payments fake driven by the payment provider's official Node SDK (npm `stripe`), the way
// the Evalon server will use it. The fake runs as its own process (`node server.mjs` on a free
// port), so this also checks the command line. Signed webhooks are verified with the SDK's own
// verifier (`webhooks.constructEvent`): that is the outside check of the signature scheme.
import { type ChildProcess, spawn } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import PaymentsSdk from 'stripe';

jest.setTimeout(30_000);

const SERVER = path.join(__dirname, 'server.mjs');
const API_KEY = 'sk_test_evalon_spec';
const WEBHOOK_SECRET = 'whsec_evalon_spec';

interface RunningFake {
  base: string;
  port: number;
  child: ChildProcess;
}

/** What the SDK's errors carry that these tests look at. */
interface SdkError {
  type: string;
  rawType?: string;
  statusCode?: number;
  code?: string;
  decline_code?: string;
  message: string;
  raw?: { payment_intent?: { id: string; status: string } };
}

/** Starts `node server.mjs` on a free port and waits for its "listening on" line. */
function startFake(env: Record<string, string> = {}): Promise<RunningFake> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [SERVER], {
      env: {
        ...process.env,
        EVALON_PAYMENTS_PORT: '0',
        EVALON_PAYMENTS_STATE_FILE: 'none',
        EVALON_PAYMENTS_WEBHOOK_URL: 'none',
        EVALON_PAYMENTS_WEBHOOK_RETRY_BASE_MS: '40',
        EVALON_PAYMENTS_WEBHOOK_RETRY_MAX_MS: '200',
        ...env,
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let output = '';
    const onData = (chunk: Buffer) => {
      output += chunk.toString();
      const match = /listening on (http:\/\/127\.0\.0\.1:(\d+))/.exec(output);
      if (match) {
        child.stdout?.off('data', onData);
        resolve({ base: match[1], port: Number(match[2]), child });
      }
    };
    child.stdout?.on('data', onData);
    child.stderr?.on('data', (chunk: Buffer) => (output += chunk.toString()));
    child.once('exit', (code) =>
      reject(new Error(`fake exited (${code}) before listening:\n${output}`)),
    );
  });
}

function stopFake(fake: RunningFake): Promise<void> {
  return new Promise((resolve) => {
    if (fake.child.exitCode !== null) return resolve();
    fake.child.once('exit', () => resolve());
    fake.child.kill('SIGTERM');
  });
}

/** The SDK pointed at the fake, as the app will construct it (no automatic retries here). */
function sdkFor(fake: RunningFake, key = API_KEY, maxNetworkRetries = 0): PaymentsSdk {
  return new PaymentsSdk(key, {
    host: '127.0.0.1',
    port: fake.port,
    protocol: 'http',
    maxNetworkRetries,
  });
}

async function control<T = Record<string, unknown>>(
  fake: RunningFake,
  route: string,
  body?: unknown,
): Promise<T> {
  const res = await fetch(`${fake.base}/__fake${route}`, {
    method: body === undefined ? 'GET' : 'POST',
    headers: { 'content-type': 'application/json' },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  return (await res.json()) as T;
}

interface FakeState {
  paymentIntents: PaymentsSdk.PaymentIntent[];
  checkoutSessions: PaymentsSdk.Checkout.Session[];
  events: PaymentsSdk.Event[];
  deliveries: {
    event: string;
    type: string;
    status: 'pending' | 'delivered' | 'failed';
    attempts: { status: number | null }[];
  }[];
}

/** Expects the promise to reject and returns the SDK error. */
async function rejection(promise: Promise<unknown>): Promise<SdkError> {
  try {
    await promise;
  } catch (err) {
    return err as SdkError;
  }
  throw new Error('expected the call to fail, but it succeeded');
}

interface Received {
  eventId: string;
  type: string;
  answered: number;
  verified: boolean;
  payload: string;
  signature: string;
}

/** A tiny webhook receiver that checks each delivery with the SDK's verifier. */
async function startReceiver(sdk: PaymentsSdk, failFirst = 0) {
  const received: Received[] = [];
  let failuresLeft = failFirst;
  let failAll = false;
  const server = http.createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => {
      const payload = Buffer.concat(chunks).toString('utf8');
      const signature = String(req.headers['stripe-signature'] ?? '');
      let verified = false;
      let event: PaymentsSdk.Event | undefined;
      try {
        event = sdk.webhooks.constructEvent(payload, signature, WEBHOOK_SECRET);
        verified = true;
      } catch {
        verified = false;
      }
      const answered = !verified ? 400 : failAll || failuresLeft > 0 ? 500 : 200;
      if (verified && !failAll && failuresLeft > 0) failuresLeft -= 1;
      received.push({
        eventId: event?.id ?? '',
        type: event?.type ?? '',
        answered,
        verified,
        payload,
        signature,
      });
      res.writeHead(answered).end();
    });
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const address = server.address();
  const port = typeof address === 'object' && address ? address.port : 0;
  return {
    url: `http://127.0.0.1:${port}/api/webhooks/payments`,
    received,
    setFailAll(value: boolean) {
      failAll = value;
    },
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

const SUCCESS_CARD = { cardNumber: '4242 4242 4242 4242', expiry: '12 / 34', cvc: '123' };
const DECLINE_CARD = { cardNumber: '4000 0000 0000 0002', expiry: '12 / 34', cvc: '123' };

function submitCard(url: string, card: Record<string, string>) {
  return fetch(url, { method: 'POST', body: new URLSearchParams(card), redirect: 'manual' });
}

let fake: RunningFake;
let sdk: PaymentsSdk;

beforeAll(async () => {
  fake = await startFake();
  sdk = sdkFor(fake);
});

afterAll(async () => {
  await stopFake(fake);
});

beforeEach(async () => {
  await control(fake, '/reset', {});
});

describe('authentication', () => {
  it('answers 401 in the provider error shape without a test secret key', async () => {
    const res = await fetch(`${fake.base}/v1/payment_intents/pi_x`);
    expect(res.status).toBe(401);
    const body = (await res.json()) as { error: { type: string; message: string } };
    expect(body.error.type).toBe('invalid_request_error');
    expect(body.error.message).toMatch(/API key/);

    const live = await rejection(
      sdkFor(fake, 'sk_live_not_here').paymentIntents.create({ amount: 100, currency: 'usd' }),
    );
    expect(live.type).toBe('StripeAuthenticationError');
    expect(live.statusCode).toBe(401);
  });
});

describe('PaymentIntents', () => {
  it('creates an intent with the fields the app reads', async () => {
    const pi = await sdk.paymentIntents.create({
      amount: 150000,
      currency: 'usd',
      capture_method: 'manual',
      description: 'Evaluation deposit',
      metadata: { loanId: '5' },
    });
    expect(pi.id).toMatch(/^pi_/);
    expect(pi).toMatchObject({
      object: 'payment_intent',
      amount: 150000,
      amount_capturable: 0,
      amount_received: 0,
      currency: 'usd',
      capture_method: 'manual',
      status: 'requires_payment_method',
      metadata: { loanId: '5' },
      latest_charge: null,
      livemode: false,
      description: 'Evaluation deposit',
    });
    expect(pi.client_secret).toMatch(new RegExp(`^${pi.id}_secret_`));
    expect(typeof pi.created).toBe('number');
    const again = await sdk.paymentIntents.retrieve(pi.id);
    expect(again.id).toBe(pi.id);
    expect(again.lastResponse.headers['request-id']).toMatch(/^req_/);
  });

  it('authorises, refuses an over-capture, captures part and releases the rest', async () => {
    const pi = await sdk.paymentIntents.create({
      amount: 5000,
      currency: 'usd',
      capture_method: 'manual',
      confirm: true,
      payment_method: 'pm_card_visa',
    });
    expect(pi.status).toBe('requires_capture');
    expect(pi.amount_capturable).toBe(5000);
    expect(pi.latest_charge).toMatch(/^ch_/);

    const tooMuch = await rejection(sdk.paymentIntents.capture(pi.id, { amount_to_capture: 5001 }));
    expect(tooMuch.type).toBe('StripeInvalidRequestError');
    expect(tooMuch.code).toBe('amount_too_large');

    const captured = await sdk.paymentIntents.capture(pi.id, { amount_to_capture: 3000 });
    expect(captured).toMatchObject({
      status: 'succeeded',
      amount_received: 3000,
      amount_capturable: 0,
    });
    const charge = await sdk.charges.retrieve(String(captured.latest_charge));
    expect(charge).toMatchObject({ captured: true, amount_captured: 3000, amount_refunded: 2000 });

    const twice = await rejection(sdk.paymentIntents.capture(pi.id));
    expect(twice.code).toBe('payment_intent_unexpected_state');
  });

  it('updates metadata (merge, empty value deletes) and cancels an authorised intent', async () => {
    const pi = await sdk.paymentIntents.create({
      amount: 2000,
      currency: 'eur',
      capture_method: 'manual',
      metadata: { loanId: '9', note: 'x' },
    });
    const updated = await sdk.paymentIntents.update(pi.id, {
      metadata: { note: '', site: 'north' },
    });
    expect(updated.metadata).toEqual({ loanId: '9', site: 'north' });

    await sdk.paymentIntents.confirm(pi.id, { payment_method: 'pm_card_visa' });
    const canceled = await sdk.paymentIntents.cancel(pi.id, {
      cancellation_reason: 'requested_by_customer',
    });
    expect(canceled).toMatchObject({
      status: 'canceled',
      cancellation_reason: 'requested_by_customer',
      amount_capturable: 0,
    });
    const again = await rejection(sdk.paymentIntents.cancel(pi.id));
    expect(again.code).toBe('payment_intent_unexpected_state');
  });

  it('answers a declined test card with a 402 card error and keeps the intent payable', async () => {
    const pi = await sdk.paymentIntents.create({ amount: 2000, currency: 'usd' });
    const err = await rejection(
      sdk.paymentIntents.confirm(pi.id, { payment_method: 'pm_card_visa_chargeDeclined' }),
    );
    expect(err.type).toBe('StripeCardError');
    expect(err.statusCode).toBe(402);
    expect(err.code).toBe('card_declined');
    expect(err.decline_code).toBe('generic_decline');
    const after = await sdk.paymentIntents.retrieve(pi.id);
    expect(after.status).toBe('requires_payment_method');
    expect(after.last_payment_error?.code).toBe('card_declined');
  });

  it.each([
    // Minimum charge amounts: docs/references.md, "Money and payments" (secondary copy of the
    // provider's table): USD 0.50, GBP 0.30, JPY 50.
    ['usd', 49, 50],
    ['gbp', 29, 30],
    ['jpy', 49, 50],
  ])(
    'enforces the minimum charge for %s (%i refused, %i accepted)',
    async (currency, below, at) => {
      const err = await rejection(sdk.paymentIntents.create({ amount: below, currency }));
      expect(err.code).toBe('amount_too_small');
      const ok = await sdk.paymentIntents.create({ amount: at, currency });
      expect(ok.amount).toBe(at);
    },
  );
});

describe('Refunds', () => {
  async function paidIntent(amount: number) {
    return sdk.paymentIntents.create({
      amount,
      currency: 'usd',
      confirm: true,
      payment_method: 'pm_card_visa',
    });
  }

  it('refunds part, refuses more than what is left, then refunds the rest', async () => {
    const pi = await paidIntent(10000);
    expect(pi.status).toBe('succeeded');
    const part = await sdk.refunds.create({ payment_intent: pi.id, amount: 2500 });
    expect(part).toMatchObject({
      object: 'refund',
      amount: 2500,
      status: 'succeeded',
      payment_intent: pi.id,
      charge: pi.latest_charge,
    });
    expect((await sdk.charges.retrieve(String(pi.latest_charge))).amount_refunded).toBe(2500);

    const over = await rejection(sdk.refunds.create({ payment_intent: pi.id, amount: 8000 }));
    expect(over.type).toBe('StripeInvalidRequestError');
    expect(over.rawType).toBe('invalid_request_error');
    // Amounts are minor units: 1000 = 10.00 USD (docs/references.md), so 8000 → $80.00 and the
    // 7500 left → $75.00 (derived).
    expect(over.message).toContain('$80.00');
    expect(over.message).toContain('$75.00');

    const rest = await sdk.refunds.create({ payment_intent: pi.id });
    expect(rest.amount).toBe(7500);
    const charge = await sdk.charges.retrieve(String(pi.latest_charge));
    expect(charge).toMatchObject({ amount_refunded: 10000, refunded: true });
    expect((await sdk.refunds.retrieve(rest.id)).amount).toBe(7500);

    const none = await rejection(sdk.refunds.create({ charge: String(pi.latest_charge) }));
    expect(none.code).toBe('charge_already_refunded');
  });

  it('refuses to refund an uncaptured hold', async () => {
    const pi = await sdk.paymentIntents.create({
      amount: 5000,
      currency: 'usd',
      capture_method: 'manual',
      confirm: true,
      payment_method: 'pm_card_visa',
    });
    const err = await rejection(sdk.refunds.create({ payment_intent: pi.id }));
    expect(err.statusCode).toBe(400);
    expect(err.message).toMatch(/not been captured/);
  });
});

describe('Checkout Sessions and the hosted page', () => {
  let receiver: Awaited<ReturnType<typeof startReceiver>>;

  beforeEach(async () => {
    receiver = await startReceiver(sdk);
    await control(fake, '/webhook-endpoints', {
      url: receiver.url,
      secret: WEBHOOK_SECRET,
      replace: true,
    });
  });

  afterEach(async () => {
    await receiver.close();
  });

  function depositSession(captureMethod: 'manual' | 'automatic') {
    return sdk.checkout.sessions.create({
      mode: 'payment',
      line_items: [
        {
          price_data: {
            currency: 'usd',
            unit_amount: 150000,
            product_data: { name: 'Refundable evaluation deposit' },
          },
          quantity: 1,
        },
      ],
      success_url: 'http://127.0.0.1:9/loans/5/paid?session={CHECKOUT_SESSION_ID}',
      cancel_url: 'http://127.0.0.1:9/loans/5',
      client_reference_id: 'loan-5',
      metadata: { loanId: '5' },
      payment_intent_data: { capture_method: captureMethod, metadata: { loanId: '5' } },
      customer_email: 'buyer@hospital.example',
    });
  }

  it('creates an open session with a hosted page showing amount, items and test cards', async () => {
    const session = await depositSession('manual');
    expect(session.id).toMatch(/^cs_test_/);
    expect(session).toMatchObject({
      object: 'checkout.session',
      url: `${fake.base}/pay/${session.id}`,
      status: 'open',
      payment_status: 'unpaid',
      amount_total: 150000,
      currency: 'usd',
      payment_intent: null,
      metadata: { loanId: '5' },
      client_reference_id: 'loan-5',
    });

    const res = await fetch(String(session.url));
    expect(res.status).toBe(200);
    const html = await res.text();
    expect(html).toContain('<title>Evalon test payment (local stand-in)</title>');
    // 150000 minor units of USD = 1,500.00 (docs/references.md: 1000 = 10.00 USD; derived).
    expect(html).toContain('$1,500.00');
    expect(html).toContain('Refundable evaluation deposit');
    expect(html).toContain('Test card that succeeds');
    expect(html).toContain('Test card that is declined');
    expect(html).toMatch(/<label for="cardNumber">/);
    expect(html).toMatch(/<input id="cardNumber" name="cardNumber" value=""/);
    expect(html).toContain('href="http://127.0.0.1:9/loans/5">Cancel and go back</a>');
  });

  it('shows a zero-decimal currency without decimals', async () => {
    const session = await sdk.checkout.sessions.create({
      mode: 'payment',
      line_items: [
        {
          price_data: { currency: 'jpy', unit_amount: 5000, product_data: { name: 'Deposit' } },
          quantity: 1,
        },
      ],
      success_url: 'http://127.0.0.1:9/ok',
    });
    const html = await (await fetch(String(session.url))).text();
    // JPY has ISO 4217 exponent 0, so 5000 minor units = ¥5,000 (docs/references.md: 10 = 10 JPY).
    expect(html).toContain('¥5,000');
    expect(html).not.toContain('¥5,000.00');
    expect(html).not.toContain('¥50.00');
  });

  it('pays with the success card: 303 to success_url, session complete, signed webhook', async () => {
    const session = await depositSession('automatic');
    const res = await submitCard(String(session.url), SUCCESS_CARD);
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe(
      `http://127.0.0.1:9/loans/5/paid?session=${session.id}`,
    );

    const after = await sdk.checkout.sessions.retrieve(session.id, { expand: ['payment_intent'] });
    expect(after).toMatchObject({ status: 'complete', payment_status: 'paid', url: null });
    const pi = after.payment_intent as PaymentsSdk.PaymentIntent;
    expect(pi).toMatchObject({
      status: 'succeeded',
      amount_received: 150000,
      metadata: { loanId: '5' },
    });

    const flushed = await control<{ settled: boolean }>(fake, '/webhooks/flush', {});
    expect(flushed.settled).toBe(true);
    const completed = receiver.received.find((r) => r.type === 'checkout.session.completed');
    expect(completed?.verified).toBe(true);
    const event = sdk.webhooks.constructEvent(
      String(completed?.payload),
      String(completed?.signature),
      WEBHOOK_SECRET,
    );
    const object = event.data.object as PaymentsSdk.Checkout.Session;
    expect(object.id).toBe(session.id);
    expect(object.metadata).toEqual({ loanId: '5' });
    expect(receiver.received.map((r) => r.type)).toContain('payment_intent.succeeded');
    // A wrong secret must not verify: the check above is not vacuous.
    expect(() =>
      sdk.webhooks.constructEvent(
        String(completed?.payload),
        String(completed?.signature),
        'whsec_wrong',
      ),
    ).toThrow();
  });

  it('with manual capture, leaves a hold: intent requires_capture, session unpaid until captured', async () => {
    const session = await depositSession('manual');
    expect((await submitCard(String(session.url), SUCCESS_CARD)).status).toBe(303);
    const after = await sdk.checkout.sessions.retrieve(session.id);
    // The provider reports `paid` only once funds are captured (common practice of its
    // Checkout with capture_method=manual; from a secondary source and memory).
    expect(after).toMatchObject({ status: 'complete', payment_status: 'unpaid' });
    const pi = await sdk.paymentIntents.retrieve(String(after.payment_intent));
    expect(pi).toMatchObject({ status: 'requires_capture', amount_capturable: 150000 });
    await control(fake, '/webhooks/flush', {});
    expect(receiver.received.map((r) => r.type)).toEqual(
      expect.arrayContaining([
        'payment_intent.amount_capturable_updated',
        'checkout.session.completed',
      ]),
    );
  });

  it('declines the decline card with a clear message (402) and keeps the session open', async () => {
    const session = await depositSession('automatic');
    const res = await submitCard(String(session.url), DECLINE_CARD);
    expect(res.status).toBe(402);
    expect(await res.text()).toContain('Your card was declined. Try another card.');
    const after = await sdk.checkout.sessions.retrieve(session.id);
    expect(after).toMatchObject({ status: 'open', payment_status: 'unpaid', payment_intent: null });
    const state = await control<FakeState>(fake, '/state');
    expect(state.events.map((e) => e.type)).toContain('payment_intent.payment_failed');

    // The same session can still be paid with another card.
    expect((await submitCard(String(session.url), SUCCESS_CARD)).status).toBe(303);
  });

  it('rejects a mistyped card number as a form error, not a payment', async () => {
    const session = await depositSession('automatic');
    const res = await submitCard(String(session.url), {
      ...SUCCESS_CARD,
      cardNumber: '4242 4242 4242 4241',
    });
    expect(res.status).toBe(400);
    expect(await res.text()).toMatch(/id="cardNumber"[^>]*aria-invalid="true"/);
    expect((await sdk.checkout.sessions.retrieve(session.id)).status).toBe('open');
  });

  it('expires a session on request and its page then says so', async () => {
    const session = await depositSession('automatic');
    const expired = await sdk.checkout.sessions.expire(session.id);
    expect(expired).toMatchObject({ status: 'expired', url: null });
    expect((await fetch(String(session.url))).status).toBe(410);
    const again = await rejection(sdk.checkout.sessions.expire(session.id));
    expect(again.statusCode).toBe(400);
  });
});

describe('idempotency', () => {
  it('replays the first answer for the same key and parameters', async () => {
    const params = { amount: 1200, currency: 'usd', metadata: { loanId: '11' } };
    const first = await sdk.paymentIntents.create(params, { idempotencyKey: 'loan-11-deposit' });
    const second = await sdk.paymentIntents.create(params, { idempotencyKey: 'loan-11-deposit' });
    expect(second.id).toBe(first.id);
    expect(second.lastResponse.headers['idempotent-replayed']).toBe('true');
    expect(first.lastResponse.headers['idempotent-replayed']).toBeUndefined();
    const state = await control<FakeState>(fake, '/state');
    expect(state.paymentIntents).toHaveLength(1);
  });

  it('refuses the same key with other parameters', async () => {
    await sdk.paymentIntents.create(
      { amount: 1200, currency: 'usd' },
      { idempotencyKey: 'k-mismatch' },
    );
    const err = await rejection(
      sdk.paymentIntents.create(
        { amount: 1300, currency: 'usd' },
        { idempotencyKey: 'k-mismatch' },
      ),
    );
    expect(err.type).toBe('StripeIdempotencyError');
    expect(err.rawType).toBe('idempotency_error');
    expect(err.statusCode).toBe(400);
  });

  it('accepts keys up to 255 characters and refuses longer ones', async () => {
    // Idempotency keys up to 255 characters (docs/references.md, provider docs).
    const ok = await sdk.paymentIntents.create(
      { amount: 100, currency: 'usd' },
      { idempotencyKey: 'k'.repeat(255) },
    );
    expect(ok.id).toMatch(/^pi_/);
    const err = await rejection(
      sdk.paymentIntents.create(
        { amount: 100, currency: 'usd' },
        { idempotencyKey: 'k'.repeat(256) },
      ),
    );
    expect(err.statusCode).toBe(400);
  });

  it('keeps a key 24 hours of the fake clock, then forgets it', async () => {
    // Keys are kept at least 24 h (docs/references.md); this fake forgets them at exactly 24 h.
    await sdk.paymentIntents.create({ amount: 100, currency: 'usd' }, { idempotencyKey: 'k-day' });
    await control(fake, '/clock', { advanceSeconds: 24 * 3600 - 1 });
    const still = await rejection(
      sdk.paymentIntents.create({ amount: 200, currency: 'usd' }, { idempotencyKey: 'k-day' }),
    );
    expect(still.rawType).toBe('idempotency_error');
    await control(fake, '/clock', { advanceSeconds: 1 });
    const fresh = await sdk.paymentIntents.create(
      { amount: 200, currency: 'usd' },
      { idempotencyKey: 'k-day' },
    );
    expect(fresh.amount).toBe(200);
  });
});

describe('authorisation holds expire', () => {
  it('cancels an uncaptured hold after 7 days with reason automatic', async () => {
    // Online card authorisations stay valid 7 days; an expired hold becomes `canceled`
    // (docs/references.md, "Money and payments", provider docs).
    const pi = await sdk.paymentIntents.create({
      amount: 50000,
      currency: 'usd',
      capture_method: 'manual',
      confirm: true,
      payment_method: 'pm_card_visa',
    });
    expect(pi.status).toBe('requires_capture');

    await control(fake, '/clock', { advanceSeconds: 7 * 24 * 3600 - 1 });
    expect((await sdk.paymentIntents.retrieve(pi.id)).status).toBe('requires_capture');

    await control(fake, '/clock', { advanceSeconds: 2 });
    const expired = await sdk.paymentIntents.retrieve(pi.id);
    expect(expired).toMatchObject({
      status: 'canceled',
      cancellation_reason: 'automatic',
      amount_capturable: 0,
    });
    const capture = await rejection(sdk.paymentIntents.capture(pi.id));
    expect(capture.code).toBe('payment_intent_unexpected_state');
    const state = await control<FakeState>(fake, '/state');
    const canceledEvent = state.events.find((e) => e.type === 'payment_intent.canceled');
    expect((canceledEvent?.data.object as PaymentsSdk.PaymentIntent).id).toBe(pi.id);
  });
});

describe('fault switches', () => {
  it('errorRate 1 fails every call with 500 api_error before applying it', async () => {
    await control(fake, '/faults', { errorRate: 1 });
    const err = await rejection(
      sdk.paymentIntents.create({ amount: 100, currency: 'usd' }, { idempotencyKey: 'k-fault' }),
    );
    expect(err.type).toBe('StripeAPIError');
    expect(err.statusCode).toBe(500);
    expect(err.rawType).toBe('api_error');
    expect((await control<FakeState>(fake, '/state')).paymentIntents).toHaveLength(0);

    // Nothing was kept for the key, so the retry after recovery runs for real.
    await control(fake, '/faults', { errorRate: 0 });
    const retry = await sdk.paymentIntents.create(
      { amount: 100, currency: 'usd' },
      { idempotencyKey: 'k-fault' },
    );
    expect(retry.lastResponse.headers['idempotent-replayed']).toBeUndefined();
    expect((await control<FakeState>(fake, '/state')).paymentIntents).toHaveLength(1);
  });

  it('mode "after" applies the change, loses the answer, and a retry with the key replays it', async () => {
    await control(fake, '/faults', { errorRate: 1, errorMode: 'after' });
    const err = await rejection(
      sdk.paymentIntents.create({ amount: 700, currency: 'usd' }, { idempotencyKey: 'k-after' }),
    );
    expect(err.statusCode).toBe(500);
    const made = (await control<FakeState>(fake, '/state')).paymentIntents;
    expect(made).toHaveLength(1);

    await control(fake, '/faults', { errorRate: 0 });
    const retry = await sdk.paymentIntents.create(
      { amount: 700, currency: 'usd' },
      { idempotencyKey: 'k-after' },
    );
    expect(retry.id).toBe(made[0].id);
    expect(retry.lastResponse.headers['idempotent-replayed']).toBe('true');
    expect((await control<FakeState>(fake, '/state')).paymentIntents).toHaveLength(1);
  });

  it('errorRate with rngStart fails the same calls on every run', async () => {
    const pi = await sdk.paymentIntents.create({ amount: 100, currency: 'usd' });
    async function pattern() {
      await control(fake, '/faults', { errorRate: 0.5, rngStart: 2027 });
      const outcomes: boolean[] = [];
      for (let i = 0; i < 24; i += 1) {
        outcomes.push(
          await sdk.paymentIntents.retrieve(pi.id).then(
            () => true,
            () => false,
          ),
        );
      }
      return outcomes;
    }
    const first = await pattern();
    const second = await pattern();
    expect(second).toEqual(first);
    expect(first).toContain(true);
    expect(first).toContain(false);
  });

  it('down answers 503 (or closes the socket) on /v1 while the control API still answers', async () => {
    await control(fake, '/faults', { down: true });
    const err = await rejection(sdk.paymentIntents.create({ amount: 100, currency: 'usd' }));
    expect(err.type).toBe('StripeAPIError');
    expect(err.statusCode).toBe(503);
    expect((await control<{ ok: boolean }>(fake, '/health')).ok).toBe(true);

    await control(fake, '/faults', { downMode: 'close' });
    const closed = await rejection(sdk.paymentIntents.create({ amount: 100, currency: 'usd' }));
    expect(closed.type).toBe('StripeConnectionError');

    await control(fake, '/faults', { down: false });
    expect((await sdk.paymentIntents.create({ amount: 100, currency: 'usd' })).status).toBe(
      'requires_payment_method',
    );
  });

  it('latencyMs delays /v1 answers', async () => {
    await control(fake, '/faults', { latencyMs: 300 });
    const started = Date.now();
    await sdk.paymentIntents.create({ amount: 100, currency: 'usd' });
    expect(Date.now() - started).toBeGreaterThanOrEqual(300);
  });
});

describe('events and webhooks', () => {
  it('retries a delivery until the receiver answers 2xx, keeping event order', async () => {
    const receiver = await startReceiver(sdk, 2);
    try {
      await control(fake, '/webhook-endpoints', {
        url: receiver.url,
        secret: WEBHOOK_SECRET,
        replace: true,
      });
      const pi = await sdk.paymentIntents.create({
        amount: 3000,
        currency: 'usd',
        confirm: true,
        payment_method: 'pm_card_visa',
      });
      const flushed = await control<{ settled: boolean; delivered: number }>(
        fake,
        '/webhooks/flush',
        {},
      );
      expect(flushed.settled).toBe(true);

      const first = receiver.received.filter((r) => r.type === 'payment_intent.created');
      expect(first.map((r) => r.answered)).toEqual([500, 500, 200]);
      expect(receiver.received.every((r) => r.verified)).toBe(true);
      // Sequential per endpoint: the later event waited until the first one got through.
      const delivered = receiver.received.filter((r) => r.answered === 200).map((r) => r.type);
      expect(delivered).toEqual(['payment_intent.created', 'payment_intent.succeeded']);

      const state = await control<FakeState>(fake, '/state');
      const record = state.deliveries.find((d) => d.type === 'payment_intent.created');
      expect(record?.status).toBe('delivered');
      expect(record?.attempts.map((a) => a.status)).toEqual([500, 500, 200]);

      const event = await sdk.events.retrieve(first[0].eventId);
      expect(event).toMatchObject({
        object: 'event',
        type: 'payment_intent.created',
        livemode: false,
        pending_webhooks: 0,
      });
      expect(event.id).toMatch(/^evt_/);
      expect(typeof event.api_version).toBe('string');
      expect((event.data.object as PaymentsSdk.PaymentIntent).id).toBe(pi.id);
    } finally {
      await receiver.close();
    }
  });

  it('gives up after maxAttempts, keeps the delivery listed, and goes on with the next event', async () => {
    const receiver = await startReceiver(sdk);
    try {
      receiver.setFailAll(true);
      await control(fake, '/webhook-endpoints', {
        url: receiver.url,
        secret: WEBHOOK_SECRET,
        replace: true,
      });
      await control(fake, '/webhooks/settings', { maxAttempts: 3 });
      await sdk.paymentIntents.create({ amount: 100, currency: 'usd' });
      await control(fake, '/webhooks/flush', {});
      receiver.setFailAll(false);
      await sdk.paymentIntents.create({ amount: 200, currency: 'usd' });
      await control(fake, '/webhooks/flush', {});

      const state = await control<FakeState>(fake, '/state');
      expect(state.deliveries.map((d) => [d.status, d.attempts.length])).toEqual([
        ['failed', 3],
        ['delivered', 1],
      ]);
      expect(state.events[0].pending_webhooks).toBe(1);
    } finally {
      await receiver.close();
    }
  });
});

describe('state file', () => {
  it('keeps intents and the fake clock across a restart when a state file is set', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'evalon-payments-fake-'));
    const env = { EVALON_PAYMENTS_STATE_FILE: path.join(dir, 'state.json') };
    let own = await startFake(env);
    try {
      const pi = await sdkFor(own).paymentIntents.create({
        amount: 900,
        currency: 'usd',
        metadata: { loanId: '3' },
      });
      await control(own, '/clock', { advanceSeconds: 3600 });
      await stopFake(own);
      own = await startFake(env);
      const again = await sdkFor(own).paymentIntents.retrieve(pi.id);
      expect(again.metadata).toEqual({ loanId: '3' });
      const clock = await control<{ offsetSeconds: number }>(own, '/clock');
      expect(clock.offsetSeconds).toBe(3600);
    } finally {
      await stopFake(own);
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});
