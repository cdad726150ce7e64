import fs from 'node:fs';
import path from 'node:path';
import { expect, test, type Browser, type Page } from '@playwright/test';
import { escapeRegExp, messagesTo, paymentsFakeUrl, signIn, type InboxMessage } from './helpers';

/*
 * Journey 1 from booking to a secured deposit: a buyer books a unit through the request
 * stepper, the lender's fleet manager approves it in the approval queue, the buyer pays on the
 * payments stand-in's hosted page and comes back to a confirmed loan; the confirmation e-mail
 * carries the calendar invite and the lender's coordinator sees it in the bell. The second test
 * is a declined card and a buyer who gives up on the hosted page.
 *
 * People and organisations come from the demo data (server/src/demo/demo-data.ts).
 */
const buyer = { email: 'buyer@velmora.example', name: 'Dana Whitcombe' };
const fleet = { email: 'fleet@quorvel.example', name: 'Marcus Tennant-Hale' };
const coordinator = { email: 'coordinator@quorvel.example', name: 'Priya Ramaswamy-Cole' };
const campus = 'Velmora East Campus';
/** A model with five units across the depots, none of them booked far ahead in the demo data. */
const model = 'Quorvel C11 11 Fr flexible cystoscope';
const keyword = 'cystoscope';

const port = process.env.EVALON_E2E_PORT ?? '8180';
const screenshots = path.resolve(__dirname, '../../docs/screenshots');

/** Saves a screenshot for the user guide when `EVALON_E2E_SCREENSHOTS` is set. */
async function shoot(page: Page, name: string): Promise<void> {
  if (!process.env.EVALON_E2E_SCREENSHOTS) return;
  fs.mkdirSync(screenshots, { recursive: true });
  await page.evaluate(() => document.fonts.ready.then(() => undefined));
  await page.screenshot({
    path: path.join(screenshots, name),
    animations: 'disabled',
    caret: 'hide',
  });
}

/** The Monday at least `days` days from today (local calendar), as `YYYY-MM-DD` and `M/D/YYYY`. */
function mondayAfter(days: number, length: number) {
  const d = new Date();
  d.setDate(d.getDate() + days);
  while (d.getDay() !== 1) d.setDate(d.getDate() + 1);
  const end = new Date(d);
  end.setDate(end.getDate() + length - 1);
  const typed = (x: Date) => `${x.getMonth() + 1}/${x.getDate()}/${x.getFullYear()}`;
  return { from: typed(d), to: typed(end) };
}

/** A person's own browser profile, signed in. */
async function signedIn(browser: Browser, person: { email: string; name: string }) {
  const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
  const page = await context.newPage();
  await signIn(page, person.email, person.name);
  return { context, page };
}

/**
 * Books the first unit of the model that fits the window, through Find equipment and the
 * request stepper; returns the new loan's reference and its page's path.
 */
async function bookThroughUi(page: Page, window: { from: string; to: string }) {
  await page
    .getByRole('navigation', { name: 'Main' })
    .getByRole('link', { name: 'Find equipment' })
    .click();
  await expect(page.getByRole('heading', { level: 1, name: 'Find equipment' })).toBeVisible();
  await page.getByLabel('Model or keyword').fill(keyword);
  await page.getByRole('combobox', { name: 'Your campus' }).click();
  await page.getByRole('option', { name: campus }).click();
  await page.getByLabel('First case day').fill(window.from);
  await page.getByLabel('Last case day').fill(window.to);
  await page.getByRole('button', { name: 'Search', exact: true }).click();
  await expect(page.getByText(/can be there in time/)).toBeVisible({ timeout: 20_000 });
  // The keyword also finds models that work with it: take a unit of the model itself.
  await page
    .locator('mat-card')
    .filter({ has: page.getByRole('heading', { level: 3, name: model }) })
    .getByRole('button', { name: 'Add to request' })
    .first()
    .click();

  await page.getByRole('link', { name: 'Review request' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Request a loan' })).toBeVisible();
  await page.getByRole('button', { name: 'Next: units' }).click();
  await expect(page.getByText(/Fits · arrives by/)).toBeVisible({ timeout: 20_000 });
  await page.getByRole('button', { name: 'Next: review' }).click();
  await page.getByRole('button', { name: 'Send request' }).click();

  await expect(page).toHaveURL(/\/loans\/\d+$/, { timeout: 20_000 });
  const reference = (await page.getByRole('heading', { level: 1 }).textContent())!.trim();
  expect(reference).toMatch(/^EV-\d{4}-\d+$/);
  await expect(page.getByText('Waiting for lender', { exact: true })).toBeVisible();
  return { reference, path: new URL(page.url()).pathname };
}

/** The fleet manager approves the request in the approval queue. */
async function approveInQueue(page: Page, reference: string): Promise<void> {
  await page
    .getByRole('navigation', { name: 'Main' })
    .getByRole('link', { name: 'Approvals' })
    .click();
  await expect(page.getByRole('heading', { level: 1, name: 'Approvals' })).toBeVisible();
  await page
    .getByRole('navigation', { name: 'Waiting loan requests' })
    .getByRole('button', { name: new RegExp(escapeRegExp(reference)) })
    .click();
  await page
    .getByRole('region', { name: `Request ${reference}` })
    .getByRole('button', { name: 'Approve' })
    .click();
  const dialog = page.getByRole('alertdialog', { name: `Approve ${reference}?` });
  await dialog.getByRole('button', { name: 'Approve' }).click();
  await expect(page.getByText(`${reference} approved.`)).toBeVisible();
}

/**
 * Opens the hosted payment page from the loan page's "Pay by card". When the server answers with
 * an error instead (the page shows it), fail with that message rather than a bare timeout.
 */
async function openPaymentPage(page: Page): Promise<void> {
  await expect(page.getByRole('heading', { level: 2, name: 'Secure the deposit' })).toBeVisible();
  await page.getByRole('button', { name: 'Pay by card' }).click();
  const hosted = new RegExp(`^${escapeRegExp(paymentsFakeUrl)}/pay/cs_`);
  const refusal = page.locator('ev-deposit-section .option .error').filter({ hasText: /\S/ });
  const outcome = await Promise.race([
    page.waitForURL(hosted, { timeout: 20_000 }).then(() => 'hosted page' as const),
    refusal.waitFor({ timeout: 20_000 }).then(() => 'refused' as const),
  ]);
  if (outcome === 'refused') {
    // A known cause: the stand-in keeps idempotency keys per API key for 24 h, and a fresh
    // database hands out the same loan and payment ids again, so the checkout key of an earlier
    // run comes back with other parameters. Give the server under test its own
    // EVALON_PAYMENTS_SECRET_KEY per run.
    throw new Error(`"Pay by card" was refused: ${await refusal.textContent()}`);
  }
}

/**
 * The payments stand-in sends its webhooks to one address per endpoint it knows; by default the
 * development server's (port 8080). Register this server's endpoint too (the same secret as the
 * server's default), so a completed checkout reaches the server under test as it would in
 * production. The loan page also asks the server to check the payment on return, so the test
 * does not depend on which arrives first.
 */
test.beforeAll(async () => {
  // `npm test` (infra/test.mjs) registers it too; this covers running Playwright on its own.
  const endpoints = `${paymentsFakeUrl}/__fake/webhook-endpoints`;
  const url = `http://127.0.0.1:${port}/api/webhooks/payments`;
  const known = (await (await fetch(endpoints)).json()) as { data?: { url: string }[] };
  if (known.data?.some((e) => e.url === url)) return;
  const response = await fetch(endpoints, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({
      url,
      secret: process.env.EVALON_PAYMENTS_WEBHOOK_SECRET ?? 'whsec_evalon_local',
    }),
  });
  expect(response.status, 'registering the webhook endpoint with the payments stand-in').toBe(201);
});

test.describe('securing the deposit', () => {
  test('a buyer books a unit, the lender approves, the card pays and the loan is confirmed', async ({
    browser,
  }) => {
    test.setTimeout(240_000);
    const startedAt = Date.now();

    const hospital = await signedIn(browser, buyer);
    await expect(hospital.page.getByRole('region', { name: 'Your next steps' })).toContainText(
      /active loans?/,
    );
    await shoot(hospital.page, 'home-buyer.png');
    const loan = await bookThroughUi(hospital.page, mondayAfter(63, 2));

    const lender = await signedIn(browser, fleet);
    await expect(lender.page.getByRole('region', { name: 'Your next steps' })).toContainText(
      /loan requests? waiting for approval/,
    );
    await shoot(lender.page, 'home-fleet.png');
    await approveInQueue(lender.page, loan.reference);
    await lender.context.close();

    // The buyer's Home now asks for the deposit of this loan.
    await hospital.page.goto('/');
    const depositLink = hospital.page.getByRole('link', {
      name: new RegExp(`Secure the deposit for ${escapeRegExp(loan.reference)}`),
    });
    await depositLink.click();
    await expect(hospital.page).toHaveURL(new RegExp(`${escapeRegExp(loan.path)}$`));
    await expect(hospital.page.getByText('Approved — deposit due', { exact: true })).toBeVisible();
    await expect(hospital.page.getByText(/due in \d+ (days|hours)/)).toBeVisible();
    await expect(
      hospital.page.getByText('By card: Charged to the card, refunded at settlement'),
    ).toBeVisible();
    await shoot(hospital.page, 'deposit-due.png');

    await openPaymentPage(hospital.page);
    await hospital.page.getByRole('button', { name: 'Test card that succeeds' }).click();
    await expect(hospital.page.getByLabel('Card number')).not.toHaveValue('');
    // The quick fill moves focus to "Pay"; the picture shows the page from its top.
    await hospital.page.evaluate(() => window.scrollTo(0, 0));
    await shoot(hospital.page, 'provider-page.png');
    await hospital.page.getByRole('button', { name: /^Pay / }).click();

    // Back on the loan page: the payment is checked and the loan shows confirmed.
    await expect(hospital.page).toHaveURL(new RegExp(`${escapeRegExp(loan.path)}$`), {
      timeout: 20_000,
    });
    await expect(
      hospital.page.getByText(`Payment received: ${loan.reference} is confirmed`),
    ).toBeVisible({ timeout: 25_000 });
    await expect(hospital.page.getByText('Confirmed', { exact: true }).first()).toBeVisible();
    const payments = hospital.page.locator('ev-loan-payments');
    await expect(payments).toContainText('Charged to the card, refunded at settlement');
    await expect(payments.locator('.chip')).toHaveText('Charged');
    await shoot(hospital.page, 'loan-confirmed.png');
    const state = await hospital.page.request.get(`/api${loan.path}`);
    expect(((await state.json()) as { loan: { state: string } }).loan.state).toBe('confirmed');
    await hospital.context.close();

    // The confirmation e-mail with the calendar invite, sent after this test started.
    let confirmation: InboxMessage | undefined;
    await expect
      .poll(
        async () => {
          confirmation = (await messagesTo(buyer.email)).find(
            (m) =>
              m.subject.startsWith(`Loan ${loan.reference} confirmed`) &&
              Date.parse(m.time) >= startedAt - 5_000,
          );
          return confirmation !== undefined;
        },
        { message: `the confirmation of ${loan.reference} to ${buyer.email}`, timeout: 30_000 },
      )
      .toBe(true);
    const invite = (confirmation!.attachments ?? []).find((a) =>
      /\.ics$/i.test(a.fileName ?? a.generatedFileName ?? ''),
    );
    expect(invite, 'an .ics attachment').toBeDefined();
    expect(invite!.contentType).toMatch(/^text\/calendar/);

    // The lender's coordinator hears about it in the bell.
    const logistics = await signedIn(browser, coordinator);
    const bell = logistics.page.getByRole('button', { name: /^Notifications, \d+ unread$/ });
    await expect(bell).toBeVisible({ timeout: 20_000 });
    await bell.click();
    const item = logistics.page.getByRole('menuitem', {
      name: new RegExp(`Loan ${escapeRegExp(loan.reference)} confirmed`),
    });
    await expect(item).toBeVisible();
    await shoot(logistics.page, 'notifications.png');
    await item.click();
    await expect(logistics.page).toHaveURL(new RegExp(`${escapeRegExp(loan.path)}$`));
    await expect(logistics.page.getByRole('heading', { level: 1 })).toHaveText(loan.reference);
    await expect(logistics.page.locator('ev-loan-payments .chip')).toHaveText('Charged');
    await logistics.context.close();
  });

  test('a declined card keeps the buyer on the payment page, and giving up leaves the loan approved', async ({
    browser,
  }) => {
    test.setTimeout(180_000);
    const hospital = await signedIn(browser, buyer);
    const loan = await bookThroughUi(hospital.page, mondayAfter(91, 2));
    const lender = await signedIn(browser, fleet);
    await approveInQueue(lender.page, loan.reference);
    await lender.context.close();

    await hospital.page.goto(loan.path);
    await openPaymentPage(hospital.page);
    const payUrl = hospital.page.url();
    await hospital.page.getByRole('button', { name: 'Test card that is declined' }).click();
    await hospital.page.getByRole('button', { name: /^Pay / }).click();
    // The stand-in says so on its own page and keeps the buyer there.
    await expect(hospital.page.getByRole('alert')).toHaveText(
      'Your card was declined. Try another card.',
    );
    expect(new URL(hospital.page.url()).pathname).toBe(new URL(payUrl).pathname);

    await hospital.page.getByRole('link', { name: 'Cancel and go back' }).click();
    await expect(hospital.page).toHaveURL(new RegExp(`${escapeRegExp(loan.path)}$`), {
      timeout: 20_000,
    });
    await expect(
      hospital.page.getByText('Payment not completed — the loan is still waiting for the deposit'),
    ).toBeVisible();
    await expect(hospital.page.getByText('Approved — deposit due', { exact: true })).toBeVisible();
    await expect(hospital.page.getByRole('button', { name: 'Pay by card' })).toBeEnabled();
    const state = await hospital.page.request.get(`/api${loan.path}`);
    expect(((await state.json()) as { loan: { state: string } }).loan.state).toBe('approved');
    await hospital.context.close();
  });
});
