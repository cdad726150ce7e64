import { spawn, type ChildProcess } from 'node:child_process';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import type { Express } from 'express';
import PaymentsSdk from 'stripe';
import type { DataSource } from 'typeorm';
import { addCalendarDays } from '@evalon/scheduling';
import {
  insertLoan,
  insertLoanEvent,
  insertLoanUnits,
} from '../../src/loans/data-access/loan-repository';
import { makeModel, makeUnit, todayUtc, type TestHospital, type TestLender } from './catalog';
import { repoRoot } from './processes';

/** The webhook secret the tests' app and fake share (the default one). */
export const webhookSecret = 'whsec_evalon_local';

/** The real payments fake (infra/fakes/payments) running as a child process on a free port. */
export interface RunningFake {
  port: number;
  base: string;
  child: ChildProcess;
  /** Calls the control API (`/__fake/...`) with a JSON body; returns the parsed answer. */
  control<T = unknown>(method: string, route: string, body?: unknown): Promise<T>;
  stop(): Promise<void>;
}

/**
 * Starts `node infra/fakes/payments/server.mjs` on a free port (it prints the port it got), state
 * in memory only, no configured webhook endpoint (a test registers its app with
 * {@link registerWebhook}), quick retries (100 ms doubling to 1 s) so a re-delivery happens
 * within a test.
 */
export function startPaymentsFake(env: Record<string, string> = {}): Promise<RunningFake> {
  const child = spawn(process.execPath, [path.join(repoRoot, 'infra/fakes/payments/server.mjs')], {
    cwd: repoRoot,
    env: {
      ...process.env,
      EVALON_PAYMENTS_PORT: '0',
      EVALON_PAYMENTS_STATE_FILE: 'none',
      EVALON_PAYMENTS_WEBHOOK_URL: 'none',
      EVALON_PAYMENTS_WEBHOOK_RETRY_BASE_MS: '100',
      EVALON_PAYMENTS_WEBHOOK_RETRY_MAX_MS: '1000',
      EVALON_PAYMENTS_WEBHOOK_MAX_ATTEMPTS: '30',
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
    const timer = setTimeout(() => {
      void stop();
      reject(new Error(`payments fake not listening within 20 s:\n${output}`));
    }, 20_000);
    const onData = (chunk: Buffer) => {
      output += chunk.toString();
      const match = /listening on (http:\/\/127\.0\.0\.1:(\d+))/.exec(output);
      if (!match) return;
      clearTimeout(timer);
      child.stdout?.off('data', onData);
      // Keep draining the pipe so a chatty fake never blocks on a full buffer.
      child.stdout?.resume();
      const base = match[1]!;
      resolve({
        port: Number(match[2]),
        base,
        child,
        async control<T>(method: string, route: string, body?: unknown): Promise<T> {
          const res = await fetch(`${base}/__fake${route}`, {
            method,
            headers: body === undefined ? {} : { 'content-type': 'application/json' },
            body: body === undefined ? undefined : JSON.stringify(body),
          });
          const text = await res.text();
          if (!res.ok && res.status !== 504) {
            throw new Error(`fake ${method} ${route} answered ${res.status}: ${text}`);
          }
          return JSON.parse(text) as T;
        },
        stop,
      });
    };
    child.stdout?.on('data', onData);
    child.stderr?.on('data', (chunk: Buffer) => (output += chunk.toString()));
    child.once('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`payments fake exited (${code}) before listening:\n${output}`));
    });
  });
}

/** Points the fake's only webhook endpoint at `url` (dropping any other). */
export async function registerWebhook(
  fake: RunningFake,
  url: string,
  enabledEvents: string[] = ['*'],
): Promise<void> {
  await fake.control('POST', '/webhook-endpoints', {
    url,
    secret: webhookSecret,
    enabledEvents,
    replace: true,
  });
}

/** Waits until the fake has no pending delivery (all delivered or given up). */
export async function flushWebhooks(fake: RunningFake, timeoutMs = 20_000): Promise<void> {
  const result = await fake.control<{ settled: boolean; pending: number }>(
    'POST',
    '/webhooks/flush',
    { timeoutMs },
  );
  if (!result.settled) throw new Error(`webhooks still pending: ${JSON.stringify(result)}`);
}

/** What `/__fake/state` lists (the parts tests read). */
export interface FakeState {
  paymentIntents: {
    id: string;
    status: string;
    amount: number;
    amount_received: number;
    amount_capturable: number;
    capture_method: string;
    metadata: Record<string, string>;
    latest_charge: string | null;
  }[];
  charges: {
    id: string;
    payment_intent: string;
    amount: number;
    amount_refunded: number;
    amount_captured: number;
  }[];
  refunds: { id: string; payment_intent: string; amount: number }[];
  checkoutSessions: {
    id: string;
    status: string;
    metadata: Record<string, string>;
    expires_at: number;
  }[];
  events: { id: string; type: string; data: { object: Record<string, unknown> } }[];
  deliveries: { event: string; status: string; attempts: { status: number | null }[] }[];
}

/** The fake's state. */
export function fakeState(fake: RunningFake): Promise<FakeState> {
  return fake.control<FakeState>('GET', '/state');
}

/** The app listening on a free loopback port (supertest alone cannot receive webhooks). */
export async function listen(app: Express): Promise<{ url: string; close(): Promise<void> }> {
  const server = http.createServer(app);
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}`,
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}

/** The test cards of the fake's hosted page (docs/payments-fake.md, "Test payment methods"). */
export const cards = {
  success: '4242 4242 4242 4242',
  declined: '4000 0000 0000 0002',
};

/**
 * Pays a checkout session on the fake's hosted page as a person would submit the form: answers
 * the status (303 to the success URL, 402 declined) and the redirect target.
 */
export async function payOnHostedPage(
  checkoutUrl: string,
  card: string = cards.success,
): Promise<{ status: number; location: string | null }> {
  const year = (new Date().getUTCFullYear() + 3) % 100;
  const res = await fetch(checkoutUrl, {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded' },
    body: new URLSearchParams({
      cardNumber: card,
      expiry: `12 / ${String(year).padStart(2, '0')}`,
      cvc: '123',
    }).toString(),
    redirect: 'manual',
  });
  await res.text();
  return { status: res.status, location: res.headers.get('location') };
}

/** Signs a webhook body as the provider does, with the SDK's own helper. */
export function signedHeader(payload: string, timestamp = Math.floor(Date.now() / 1000)): string {
  return PaymentsSdk.webhooks.generateTestHeaderString({
    payload,
    secret: webhookSecret,
    timestamp,
  });
}

/** POSTs a raw webhook body with a signature header; answers status and JSON body. */
export async function deliver(
  appUrl: string,
  payload: string,
  signature: string | null,
): Promise<{
  status: number;
  body: { received?: boolean; outcome?: string; error?: { code: string } };
}> {
  const res = await fetch(`${appUrl}/api/webhooks/payments`, {
    method: 'POST',
    headers: {
      'content-type': 'application/json; charset=utf-8',
      ...(signature ? { 'stripe-signature': signature } : {}),
    },
    body: payload,
  });
  return { status: res.status, body: (await res.json()) as never };
}

/**
 * Inserts an approved loan straight into the tables (no availability check), for footprints the
 * booking flow would not produce on today's calendar: a short one for the authorisation-hold
 * strategy, or one with a zero deposit. Days are offsets from today (UTC).
 */
export async function insertApprovedLoan(
  ds: DataSource,
  lender: TestLender,
  hospital: TestHospital,
  options: {
    shipInDays?: number;
    footprintDays?: number;
    depositAmount?: number;
    currency?: string;
    approvedAt?: Date;
  } = {},
): Promise<{ id: number; reference: string; unitId: number }> {
  const ship = addCalendarDays(todayUtc(), options.shipInDays ?? 1);
  const footprint = options.footprintDays ?? 4;
  const modelId = await makeModel(ds, lender.id, { currency: options.currency ?? 'USD' });
  const unitId = await makeUnit(ds, modelId, lender.depotId);
  const milestones = {
    shipBy: ship,
    deliverBy: addCalendarDays(ship, 1),
    useFrom: addCalendarDays(ship, 1),
    useTo: addCalendarDays(ship, 1),
    returnShipBy: addCalendarDays(ship, 2),
    backAtDepot: addCalendarDays(ship, 3),
    readyAgain: addCalendarDays(ship, footprint),
  };
  const deposit = options.depositAmount ?? 100_000;
  const now = new Date();
  return ds.transaction(async (m) => {
    const loan = await insertLoan(
      m,
      {
        hospitalId: hospital.id,
        siteId: hospital.campusId,
        siteTimeZone: 'America/New_York',
        lenderId: lender.id,
        milestones,
        depositAmount: deposit,
        depositCurrency: options.currency ?? 'USD',
        note: null,
        requestedByUserId: hospital.buyer.userId,
      },
      now,
    );
    await insertLoanUnits(m, loan.id, hospital.id, [
      {
        unitId,
        modelId,
        depotId: lender.depotId,
        depotTimeZone: 'America/New_York',
        milestones,
        depositAmount: deposit,
      },
    ]);
    await insertLoanEvent(
      m,
      {
        loanId: loan.id,
        actorUserId: hospital.buyer.userId,
        fromState: null,
        toState: 'requested',
        reason: null,
      },
      now,
    );
    await m.query("UPDATE loans SET state = 'approved' WHERE id = ?", [loan.id]);
    await insertLoanEvent(
      m,
      {
        loanId: loan.id,
        actorUserId: lender.fleet.userId,
        fromState: 'requested',
        toState: 'approved',
        reason: null,
      },
      options.approvedAt ?? now,
    );
    return { ...loan, unitId };
  });
}

/**
 * A minimal PDF made in code (ISO 32000-1 §7.5: header, one page object tree, a cross-reference
 * table with the byte offset of each object, trailer, `startxref`, `%%EOF`), so the upload
 * tests need no binary fixture.
 */
export function minimalPdf(text = 'Purchase order 4711'): Buffer {
  const stream = `BT /F1 18 Tf 72 720 Td (${text.replace(/[()\\]/g, '')}) Tj ET`;
  const objects = [
    '<< /Type /Catalog /Pages 2 0 R >>',
    '<< /Type /Pages /Kids [3 0 R] /Count 1 >>',
    '<< /Type /Page /Parent 2 0 R /MediaBox [0 0 612 792] /Contents 4 0 R /Resources << /Font << /F1 5 0 R >> >> >>',
    `<< /Length ${Buffer.byteLength(stream, 'latin1')} >>\nstream\n${stream}\nendstream`,
    '<< /Type /Font /Subtype /Type1 /BaseFont /Helvetica >>',
  ];
  let body = '%PDF-1.4\n%\xe2\xe3\xcf\xd3\n';
  const offsets: number[] = [];
  objects.forEach((object, i) => {
    offsets.push(Buffer.byteLength(body, 'latin1'));
    body += `${i + 1} 0 obj\n${object}\nendobj\n`;
  });
  const xref = Buffer.byteLength(body, 'latin1');
  body += `xref\n0 ${objects.length + 1}\n0000000000 65535 f \n`;
  for (const offset of offsets) body += `${String(offset).padStart(10, '0')} 00000 n \n`;
  body += `trailer\n<< /Size ${objects.length + 1} /Root 1 0 R >>\nstartxref\n${xref}\n%%EOF\n`;
  return Buffer.from(body, 'latin1');
}
