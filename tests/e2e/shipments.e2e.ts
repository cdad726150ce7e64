import fs from 'node:fs';
import path from 'node:path';
import { expect, test, type Browser, type Page } from '@playwright/test';
import { tinyPng } from '../../server/test/helpers/images';
import { escapeRegExp, paymentsFakeUrl, signIn, waitForMessages } from './helpers';

/*
 * Journey 3 after a confirmed loan: the coordinator packs by typing scans into the wedge field
 * (one refused for a GTIN not on the list, one for an expiry before the last case day), opens
 * the packing slip and hands over to the carrier stand-in; the stand-in delivers; the buyer
 * confirms receipt, attests decontamination and books the return; the coordinator receives it,
 * inspects with one charge and settles; the buyer's statement e-mail shows the deduction and
 * the refund, the loan is closed and the stand-in holds exactly one refund.
 *
 * Booking, approval and the card deposit run through the API here (the deposit journey's own
 * test covers them on screen). People and units come from the demo data.
 */
const buyer = { email: 'buyer@velmora.example', name: 'Dana Whitcombe' };
const fleet = { email: 'fleet@quorvel.example', name: 'Marcus Tennant-Hale' };
const coordinator = { email: 'coordinator@quorvel.example', name: 'Priya Ramaswamy-Cole' };
const campus = 'Velmora East Campus';
const serial = 'QC11-0001';

const port = process.env.EVALON_E2E_PORT ?? '8180';
const carrierUrl = `http://127.0.0.1:${process.env.EVALON_CARRIER_PORT ?? '12211'}`;
const screenshots = path.resolve(__dirname, '../../docs/screenshots');

async function shoot(page: Page, name: string): Promise<void> {
  if (!process.env.EVALON_E2E_SCREENSHOTS) return;
  fs.mkdirSync(screenshots, { recursive: true });
  await page.evaluate(() => document.fonts.ready.then(() => undefined));
  await page.screenshot({
    path: path.join(screenshots, name),
    animations: 'disabled',
    caret: 'hide',
    fullPage: false,
  });
}

async function signedIn(browser: Browser, person: { email: string; name: string }) {
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const page = await context.newPage();
  await signIn(page, person.email, person.name);
  return { context, page };
}

/** Calls the API with the page's session and its CSRF token. */
async function api<T>(page: Page, method: string, url: string, data?: unknown): Promise<T> {
  const token = (await page.context().cookies()).find((c) => c.name === 'XSRF-TOKEN')?.value ?? '';
  const res = await page.request.fetch(url, {
    method,
    data,
    headers: { 'X-XSRF-TOKEN': token },
  });
  const body = await res.text();
  expect(res.ok(), `${method} ${url}: ${res.status()} ${body}`).toBe(true);
  return (body ? JSON.parse(body) : undefined) as T;
}

async function carrier(route: string, body: unknown = {}) {
  const res = await fetch(`${carrierUrl}/__fake${route}`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify(body),
  });
  expect(res.ok, `carrier ${route}`).toBe(true);
  return res.json();
}

/** The first Monday at least `days` days ahead, `YYYY-MM-DD`. */
function monday(days: number): string {
  const d = new Date();
  d.setUTCDate(d.getUTCDate() + days);
  while (d.getUTCDay() !== 1) d.setUTCDate(d.getUTCDate() + 1);
  return d.toISOString().slice(0, 10);
}

test.beforeAll(async () => {
  // Tracking events go to the server under test (the stand-in's default is the dev server).
  await carrier('/webhook-endpoint', {
    url: `http://127.0.0.1:${port}/api/webhooks/carrier`,
    secret: process.env.EVALON_CARRIER_WEBHOOK_SECRET ?? 'carrier_whsec_evalon_local',
  });
  await carrier('/settings', { stepMs: 0 });
});

test('pack by scans, ship, deliver, receive, return, inspect with a charge and settle', async ({
  browser,
}) => {
  test.setTimeout(300_000);
  const startedAt = Date.now();
  const hospital = await signedIn(browser, buyer);
  const b = hospital.page;

  // A confirmed loan with a card deposit (charged now, refunded at settlement).
  const sites = await api<{ items: { id: number; name: string; organisationId: number }[] }>(
    b,
    'GET',
    '/api/sites',
  );
  const siteId = sites.items.find((s) => s.name === campus)!.id;
  const lenderId = sites.items.find((s) => s.name === 'Quorvel East Depot')!.organisationId;
  const units = await api<{ items: { id: number; serialNumber: string }[] }>(
    b,
    'GET',
    `/api/units?lenderId=${lenderId}`,
  );
  const unitId = units.items.find((u) => u.serialNumber === serial)!.id;
  const useFrom = monday(150);
  const useTo = new Date(Date.parse(useFrom) + 86_400_000).toISOString().slice(0, 10);
  const { loan } = await api<{
    loan: { id: number; reference: string; deposit: { amount: number } };
  }>(b, 'POST', '/api/loans', { siteId, unitIds: [unitId], useFrom, useTo });
  const lender = await signedIn(browser, fleet);
  await api(lender.page, 'POST', `/api/loans/${loan.id}/approve`, {});
  await lender.context.close();
  const checkout = await api<{ checkoutUrl: string }>(b, 'POST', `/api/loans/${loan.id}/deposit`, {
    method: 'card',
  });
  await b.goto(checkout.checkoutUrl);
  await b.getByRole('button', { name: 'Test card that succeeds' }).click();
  await b.getByRole('button', { name: /^Pay/ }).click();
  await expect(b).toHaveURL(new RegExp(`/loans/${loan.id}`), { timeout: 30_000 });
  await expect(b.locator('ev-loan-state-chip').getByText('Confirmed', { exact: true })).toBeVisible(
    {
      timeout: 30_000,
    },
  );

  // The coordinator's board lists the new outbound leg to pack.
  const coord = await signedIn(browser, coordinator);
  const c = coord.page;
  await c
    .getByRole('navigation', { name: 'Main' })
    .getByRole('link', { name: 'Shipments' })
    .click();
  await expect(c.getByRole('heading', { level: 1, name: 'Shipments' })).toBeVisible();
  await expect(c.getByText('Overdue').first()).toBeVisible();
  await shoot(c, 'shipments-board.png');
  await c.getByRole('button', { name: /To pack/ }).click();
  await c.getByRole('link', { name: `${loan.reference}-O1` }).click();
  await expect(c.getByRole('heading', { level: 1, name: `${loan.reference}-O1` })).toBeVisible();

  const shipmentId = Number(new URL(c.url()).pathname.split('/').pop());
  const detail = await api<{
    shipment: {
      checklist: { name: string; gtin: string; needsSerial: boolean; quantity: number }[];
      lastCaseDay: string;
    };
  }>(c, 'GET', `/api/shipments/${shipmentId}`);
  const field = c.getByLabel('Barcode');
  const type = async (raw: string) => {
    await field.fill(raw);
    await field.press('Enter');
  };
  // The GS1 example GTIN-13 4006381333931 as GTIN-14: valid, but not on this list.
  await type('(01)04006381333931(17)301231(10)X1');
  await expect(c.locator('#scan-result')).toContainText('not on this shipment’s checklist');
  const lotLine = detail.shipment.checklist.find((i) => !i.needsSerial)!;
  const dayBefore = new Date(Date.parse(detail.shipment.lastCaseDay) - 86_400_000).toISOString();
  const yymmdd = (iso: string) => iso.slice(2, 4) + iso.slice(5, 7) + iso.slice(8, 10);
  await type(`(01)${lotLine.gtin}(17)${yymmdd(dayBefore)}(10)LT-1`);
  await expect(c.locator('#scan-result')).toContainText('before the loan’s last case day');
  for (const item of detail.shipment.checklist) {
    for (let n = 0; n < item.quantity; n += 1) {
      await type(
        item.needsSerial
          ? `(01)${item.gtin}(21)${serial}`
          : `(01)${item.gtin}(17)301231(10)LOT-${n + 1}`,
      );
      await expect(c.locator('#scan-result')).toContainText(item.name);
    }
  }
  await expect(c.getByText('Scan refused:').first()).toBeVisible();
  await shoot(c, 'shipment-packing.png');
  await c.getByRole('button', { name: 'Mark packed' }).click();
  await expect(c.getByText(/Packed\. SSCC \d{18}/)).toBeVisible();
  const slip = await c.request.get(`/api/shipments/${shipmentId}/packing-slip.pdf`);
  expect(slip.headers()['content-type']).toBe('application/pdf');
  expect((await slip.body()).subarray(0, 5).toString()).toBe('%PDF-');
  await c.getByRole('button', { name: 'Hand over to the carrier' }).click();
  await expect(c.getByText(/Handed to the carrier: WP\d{10}/)).toBeVisible();
  const tracking = (await c.getByText(/Wendrow Parcel · WP\d{10}/).textContent())!.match(
    /WP\d{10}/,
  )![0];

  // With the carrier: on the coordinator's map, a great-circle route and a line in the list.
  await c.goto('/shipments');
  await c.getByRole('link', { name: 'Map of shipments in transit' }).click();
  const listed = c
    .getByRole('list', { name: 'Shipments in transit' })
    .getByRole('listitem')
    .filter({ hasText: `${loan.reference}-O1` });
  await expect(listed).toContainText('Outbound:');
  await listed.getByRole('button', { name: `Show ${loan.reference}-O1 on the map` }).click();
  await expect(listed.getByRole('button')).toHaveAttribute('aria-pressed', 'true');
  // 31 dots between the two ends, plus the ends (the stand-in's advanced-marker elements).
  await expect
    .poll(() => c.locator(`[title^="${loan.reference}-O1:"]`).count(), { timeout: 15_000 })
    .toBe(31);
  await c.goBack();

  // The stand-in delivers.
  await carrier(`/shipments/${tracking}/advance`, { to: 'delivered' });
  await carrier('/webhooks/flush', {});

  // The buyer sees it on the loan page and confirms receipt, decontamination and the return.
  await b.goto(`/loans/${loan.id}`);
  await expect(b.locator('ev-loan-shipments')).toContainText('Delivered');
  await b.locator('ev-loan-shipments').scrollIntoViewIfNeeded();
  await shoot(b, 'loan-shipments.png');
  await b.locator('ev-loan-shipments').getByRole('link', { name: 'Open' }).first().click();
  // A receipt photo: chosen in the file picker, uploaded, shown as a thumbnail.
  await b.locator('#receipt-photo-file').setInputFiles({
    name: 'case-on-arrival.png',
    mimeType: 'image/png',
    buffer: tinyPng(160, 120, [120, 132, 140]),
  });
  await expect(b.getByRole('img', { name: /^Receipt photo \d+ by Dana Whitcombe$/ })).toBeVisible();
  await b.getByRole('button', { name: 'Confirm receipt' }).click();
  await expect(b.getByText('Receipt confirmed by the hospital: everything present.')).toBeVisible();
  await b.goto(`/loans/${loan.id}`);
  await b.locator('ev-loan-shipments').getByRole('link', { name: 'Open' }).first().click();
  await expect(b.getByRole('heading', { level: 1, name: `${loan.reference}-R1` })).toBeVisible();
  await b.getByLabel('Method').fill('Manual clean and low-temperature sterilisation per the IFU');
  await b.getByLabel('By whom').fill('Sterile processing, day shift');
  await b.getByRole('button', { name: 'Record decontamination' }).click();
  await b.getByRole('button', { name: 'Hand over to the carrier' }).click();
  await expect(b.getByText(/Handed to the carrier: WP\d{10}/)).toBeVisible();
  const back = (await b.getByText(/Wendrow Parcel · WP\d{10}/).textContent())!.match(
    /WP\d{10}/,
  )![0];
  await carrier(`/shipments/${back}/advance`, { to: 'delivered' });
  await carrier('/webhooks/flush', {});

  // The coordinator scans what came back, receives, inspects with one charge and settles.
  await c.goto(`/shipments/${shipmentId + 1}`);
  await expect(c.getByRole('heading', { level: 1, name: `${loan.reference}-R1` })).toBeVisible();
  for (const item of detail.shipment.checklist) {
    for (let n = 0; n < item.quantity; n += 1) {
      await type(
        item.needsSerial ? `(01)${item.gtin}(21)${serial}` : `(01)${item.gtin}(10)LOT-${n + 1}`,
      );
      await expect(c.locator('#scan-result')).toContainText(item.name);
    }
  }
  await c.getByRole('button', { name: 'Receive at depot' }).click();
  await expect(c.getByText('Received; nothing missing.')).toBeVisible();
  await c.getByRole('button', { name: 'Add finding' }).click();
  await c.getByLabel('Finding').fill('Bent deflection lever');
  await c.getByLabel('Charge').fill('120');
  await c.getByLabel('Inspection photo files, row 1').setInputFiles({
    name: 'lever.png',
    mimeType: 'image/png',
    buffer: tinyPng(160, 120, [176, 92, 60]),
  });
  await expect(
    c.getByRole('list', { name: 'Inspection photos, row 1' }).getByRole('img'),
  ).toBeVisible();
  await c.getByRole('button', { name: 'Record inspection' }).scrollIntoViewIfNeeded();
  await shoot(c, 'shipment-inspection.png');
  await c.getByRole('button', { name: 'Record inspection' }).click();
  await expect(c.getByText('Inspection recorded.')).toBeVisible();
  await expect(
    c.getByRole('img', { name: 'Inspection photo: damage: Bent deflection lever' }),
  ).toBeVisible();
  await c.getByRole('button', { name: 'Settle deposit and close' }).click();
  await expect(c.getByText(/Deposit settled: 120\.00 kept/)).toBeVisible();

  // The statement e-mail, the closed loan and one refund at the payments stand-in.
  const [statement] = await waitForMessages(
    buyer.email,
    new RegExp(`${escapeRegExp(loan.reference)} closed`),
  );
  expect(statement.text).toContain('Bent deflection lever');
  expect(statement.text).toMatch(/Deducted:\s*\$120\.00/);
  const refund = loan.deposit.amount - 12_000;
  expect(statement.text).toContain(
    `$${(refund / 100).toLocaleString('en-US', { minimumFractionDigits: 2 })}`,
  );
  await b.goto(`/loans/${loan.id}`);
  await expect(b.getByText('Closed', { exact: true }).first()).toBeVisible();
  const state = (await (await fetch(`${paymentsFakeUrl}/__fake/state`)).json()) as {
    refunds: { amount: number; created: number; metadata?: Record<string, string> }[];
  };
  // The stand-in outlives test databases, whose loan ids repeat: only this run's refunds.
  const ours = state.refunds.filter(
    (r) => r.metadata?.loanId === String(loan.id) && r.created * 1000 >= startedAt - 1_000,
  );
  expect(ours.map((r) => r.amount)).toEqual([refund]);
  await coord.context.close();
  await hospital.context.close();
});
