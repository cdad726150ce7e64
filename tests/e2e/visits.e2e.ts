import fs from 'node:fs';
import path from 'node:path';
import {
  expect,
  request as playwrightRequest,
  test,
  type Browser,
  type Page,
} from '@playwright/test';
import { createConnection } from 'mysql2/promise';
import { demoPassword, signIn, waitForMessages } from './helpers';

/*
 * Journey 2 from a confirmed loan to a signed-off trainee: the buyer asks for a proctor from the
 * loan's page, sees the ranked candidates with their reasons and the excluded ones with why, and
 * asks two in order; the first declines with a reason, the second is offered automatically and
 * accepts; both the proctor and the buyer receive the invite (read from the SMTP catcher); the
 * proctor records three supervised cases and signs the trainee off; the one-page PDF downloads.
 *
 * People come from the demo data (server/src/demo/demo-data.ts, demo-proctors.ts). The loan is
 * booked, approved and confirmed through the API (journey 1 has its own browser test).
 */
const buyer = { email: 'buyer@velmora.example', name: 'Dana Whitcombe' };
const fleet = { email: 'fleet@quorvel.example', name: 'Marcus Tennant-Hale' };
const first = { email: 'm.quintanar@proctors.example', name: 'Marisol Quintanar-Ek' };
const second = { email: 'proctor@proctors.example', name: 'Helena Osterby' };
const trainee = 'Rafael Oyelaran';
const campus = 'Velmora East Campus';
const model = 'Quorvel R2 robotic platform';

const port = process.env.EVALON_E2E_PORT ?? '8180';
const baseURL = `http://127.0.0.1:${port}`;
const screenshots = path.resolve(__dirname, '../../docs/screenshots');

/**
 * Saves a screenshot for the user guide when `EVALON_E2E_SCREENSHOTS` (all browser tests) or
 * `EVALON_VISIT_SCREENSHOTS` (this one only) is set.
 */
async function shoot(page: Page, name: string): Promise<void> {
  if (!process.env.EVALON_E2E_SCREENSHOTS && !process.env.EVALON_VISIT_SCREENSHOTS) return;
  fs.mkdirSync(screenshots, { recursive: true });
  await page.evaluate(() => document.fonts.ready.then(() => undefined));
  await page.screenshot({
    path: path.join(screenshots, name),
    animations: 'disabled',
    caret: 'hide',
    fullPage: true,
  });
}

/** A signed-in API client that echoes the CSRF token. */
async function apiAs(email: string) {
  const ctx = await playwrightRequest.newContext({ baseURL });
  const token = async () =>
    (await ctx.storageState()).cookies.find((c) => c.name === 'XSRF-TOKEN')?.value ??
    ((await (await ctx.get('/api/auth/csrf')).json()) as { csrfToken: string }).csrfToken;
  await ctx.get('/api/auth/csrf');
  const login = await ctx.post('/api/auth/login', {
    headers: { 'X-XSRF-TOKEN': await token() },
    data: { email, password: demoPassword },
  });
  expect(login.status(), `sign-in of ${email}`).toBe(200);
  const send = async (method: 'post' | 'put', url: string, data: object) => {
    const res = await ctx[method](url, { headers: { 'X-XSRF-TOKEN': await token() }, data });
    expect(res.ok(), `${method} ${url}: ${res.status()} ${await res.text()}`).toBe(true);
    return res.json();
  };
  return { ctx, get: async (url: string) => (await ctx.get(url)).json(), send };
}

/**
 * Cases are recorded only on a visit's days, but the loan's case days are weeks ahead and the
 * server reads the real clock. So the test lets the days come: it moves the accepted visit's
 * days (and the proctor's busy days) to today and tomorrow at the campus, in the e2e database.
 */
async function visitDaysArrive(reference: string): Promise<void> {
  const db = await createConnection({
    host: process.env.EVALON_DB_HOST ?? '127.0.0.1',
    port: Number(process.env.EVALON_DB_PORT ?? 3307),
    user: process.env.EVALON_DB_USER ?? 'evalon',
    password: process.env.EVALON_DB_PASSWORD ?? 'evalon-local',
    database: process.env.EVALON_DB_NAME!,
  });
  try {
    const [rows] = await db.query('SELECT site_time_zone AS zone FROM visits WHERE reference = ?', [
      reference,
    ]);
    const zone = (rows as { zone: string }[])[0]!.zone;
    const today = new Intl.DateTimeFormat('en-CA', { timeZone: zone }).format(new Date());
    const tomorrow = new Date(Date.parse(`${today}T00:00:00Z`) + 86_400_000)
      .toISOString()
      .slice(0, 10);
    await db.query(
      `UPDATE visits SET visit_from = ?, visit_to = ?, busy_from = ?, busy_to = ?
        WHERE reference = ? AND state = 'accepted'`,
      [today, tomorrow, today, tomorrow, reference],
    );
  } finally {
    await db.end();
  }
}

/** A Tuesday–Wednesday at least `days` ahead (UTC calendar), as ISO dates. */
function tuesdayAfter(days: number): { from: string; to: string } {
  const d = new Date(Date.now() + days * 86_400_000);
  while (d.getUTCDay() !== 2) d.setUTCDate(d.getUTCDate() + 1);
  const from = d.toISOString().slice(0, 10);
  d.setUTCDate(d.getUTCDate() + 1);
  return { from, to: d.toISOString().slice(0, 10) };
}

/** Books, approves and confirms (purchase order under a credit agreement) a loan of the model. */
async function confirmedLoan(): Promise<{ id: number; from: string; to: string }> {
  const hospital = await apiAs(buyer.email);
  const lender = await apiAs(fleet.email);
  const sites = (await hospital.get('/api/sites')).items as {
    id: number;
    name: string;
    organisationId: number;
  }[];
  const site = sites.find((s) => s.name === campus)!;
  const models = (await hospital.get('/api/models')).items as {
    id: number;
    name: string;
    lenderId: number;
  }[];
  const robot = models.find((m) => m.name === model)!;
  // A random week 10–30 weeks ahead, so a run against a database an earlier run used still fits.
  for (let attempt = 0; attempt < 10; attempt++) {
    const window = tuesdayAfter(70 + 7 * Math.floor(Math.random() * 20));
    const found = await hospital.get(
      `/api/availability?modelId=${robot.id}&siteId=${site.id}&useFrom=${window.from}&useTo=${window.to}`,
    );
    const unit = (found.items as { unitId: number; modelId: number; feasible: boolean }[]).find(
      (u) => u.feasible && u.modelId === robot.id,
    );
    if (!unit) continue;
    const { loan } = await hospital.send('post', '/api/loans', {
      siteId: site.id,
      unitIds: [unit.unitId],
      useFrom: window.from,
      useTo: window.to,
    });
    await lender.send('post', `/api/loans/${loan.id}/approve`, {});
    await lender.send(
      'put',
      `/api/lenders/${robot.lenderId}/credit-agreements/${site.organisationId}`,
      {
        active: true,
      },
    );
    await hospital.send('post', `/api/loans/${loan.id}/deposit`, {
      method: 'credit_agreement',
      purchaseOrderNumber: `PO-${Date.now()}`,
    });
    await hospital.ctx.dispose();
    await lender.ctx.dispose();
    return { id: loan.id, ...window };
  }
  throw new Error('no robotic platform unit fits any window tried');
}

async function signedIn(browser: Browser, person: { email: string; name: string }) {
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const page = await context.newPage();
  await signIn(page, person.email, person.name);
  return { context, page };
}

test('a buyer asks for a proctor from a confirmed loan; the second proctor accepts and signs the trainee off', async ({
  browser,
}) => {
  test.setTimeout(240_000);
  const startedAt = Date.now();
  const loan = await confirmedLoan();

  // The buyer asks from the loan's page; the request form comes prefilled.
  const hospital = await signedIn(browser, buyer);
  await hospital.page.goto(`/loans/${loan.id}`);
  await hospital.page.getByRole('link', { name: 'Ask for a proctor' }).click();
  await expect(
    hospital.page.getByRole('heading', { level: 1, name: 'Ask for a proctor' }),
  ).toBeVisible();
  await expect(hospital.page.getByLabel('First case day')).toHaveValue(loan.from);
  await hospital.page.getByRole('button', { name: 'Find proctors' }).click();

  const eligible = hospital.page.getByRole('list', { name: 'Proctors who can come' });
  await expect(eligible.getByText(first.name)).toBeVisible({ timeout: 20_000 });
  await expect(eligible).toContainText(/supervised cases on this model/);
  await expect(eligible).toContainText(/Licensed in US-MA until/);
  const excluded = hospital.page.getByRole('list', { name: 'Proctors who cannot come' });
  await expect(excluded).toContainText(/Konstanze Wirbeleit/);
  await shoot(hospital.page, 'visit-candidates.png');

  await eligible.getByRole('checkbox', { name: new RegExp(first.name) }).check();
  await eligible.getByRole('checkbox', { name: new RegExp(second.name) }).check();
  await hospital.page.getByRole('button', { name: 'Ask 2 in this order' }).click();
  await expect(hospital.page).toHaveURL(/\/visits\/\d+$/, { timeout: 20_000 });
  const visitPath = new URL(hospital.page.url()).pathname;
  const reference = (await hospital.page.getByRole('heading', { level: 1 }).textContent())!.trim();
  expect(reference).toMatch(/^PV-\d{4}-\d{6}$/);
  await expect(hospital.page.getByText(`Offered to ${first.name}`)).toBeVisible();

  // The first proctor declines with a reason.
  const one = await signedIn(browser, first);
  await one.page.goto('/proctor');
  const offer = one.page.locator(`mat-card[data-reference="${reference}"]`);
  await expect(offer).toContainText(/left/);
  await shoot(one.page, 'proctor-offers.png');
  await offer.getByLabel('Reason for declining').fill('Operating at my own hospital that week.');
  await offer.getByRole('button', { name: 'Decline' }).click();
  await expect(offer).toHaveCount(0);
  await one.context.close();

  // The second is offered automatically and accepts.
  const two = await signedIn(browser, second);
  await two.page.goto('/proctor');
  const offered = two.page.locator(`mat-card[data-reference="${reference}"]`);
  await expect(offered).toBeVisible();
  await offered.getByRole('button', { name: 'Accept' }).click();
  await expect(offered).toHaveCount(0);

  // Both receive the invite (METHOD:REQUEST) through the SMTP catcher.
  const subject = new RegExp(`Visit ${reference} accepted`);
  for (const address of [second.email, buyer.email]) {
    const [mail] = await waitForMessages(address, subject);
    expect(Date.parse(mail!.time)).toBeGreaterThanOrEqual(startedAt - 60_000);
    expect(mail!.attachments?.some((a) => a.contentType?.startsWith('text/calendar'))).toBe(true);
  }

  // Before the first day the proctor can still withdraw and cannot record cases yet.
  await two.page.goto(visitPath);
  await expect(two.page.getByRole('button', { name: 'Withdraw from visit' })).toBeVisible();
  await expect(two.page.getByText(/Cases can be recorded from/)).toBeVisible();

  // The proctor records three supervised cases on the visit's days and signs the trainee off.
  await visitDaysArrive(reference);
  await two.page.goto(visitPath);
  await expect(two.page.locator('ev-page-header .state')).toHaveText('Accepted');
  for (let n = 1; n <= 3; n++) {
    await two.page.getByLabel('Case number').fill(String(n));
    await two.page.getByRole('combobox', { name: 'Trainee', exact: true }).click();
    await two.page.getByRole('option', { name: trainee }).click();
    await two.page
      .getByLabel('Notes (de-identified)')
      .fill(n === 1 ? 'Docking on the second attempt.' : 'Smooth docking.');
    await two.page.getByRole('button', { name: 'Record case' }).click();
    await expect(
      two.page.getByRole('heading', { name: `Supervised cases (${n} of` }),
    ).toBeVisible();
  }
  await two.page.getByRole('button', { name: `Sign off ${trainee}` }).click();
  await expect(two.page.locator('ev-page-header .state')).toHaveText('Signed off');
  const pdfLink = two.page.getByRole('link', { name: /Record \(PDF\)/ });
  await expect(pdfLink).toBeVisible();
  await shoot(two.page, 'visit-signed-off.png');
  const pdf = await two.page.request.get((await pdfLink.getAttribute('href'))!);
  expect(pdf.status()).toBe(200);
  expect(pdf.headers()['content-type']).toBe('application/pdf');
  expect((await pdf.body()).subarray(0, 5).toString()).toBe('%PDF-');

  // The proctor's own pages: credentials with their standing, availability with 8 weeks ahead.
  await two.page.goto('/proctor/credentials');
  await expect(two.page.getByRole('cell', { name: 'Illinois medical licence' })).toBeVisible();
  await shoot(two.page, 'proctor-credentials.png');
  await two.page.goto('/proctor/availability');
  await expect(two.page.getByRole('gridcell')).toHaveCount(56);
  await shoot(two.page, 'proctor-availability.png');
  await two.page.goto('/proctor');
  await expect(two.page.getByRole('heading', { name: /Your visits/ })).toBeVisible();
  await two.context.close();

  // The hospital sees the whole timeline, and can download the record too.
  await hospital.page.goto(visitPath);
  const timeline = hospital.page.locator('.timeline');
  await expect(timeline).toContainText('Declined');
  await expect(timeline).toContainText('Operating at my own hospital that week.');
  await expect(timeline).toContainText('Signed off');
  await shoot(hospital.page, 'visit-page.png');
  await hospital.page.goto('/visits');
  await expect(hospital.page.getByRole('link', { name: reference })).toBeVisible();
  await shoot(hospital.page, 'visits-list.png');
  await hospital.context.close();
});
