// Screenshots for the user guide (docs/user-guide.md), taken from a running Evalon with fresh
// demo data (`npm run demo:reset` first), at 1280×800:
//
//   node tests/e2e/screenshots.mjs [baseUrl] [--only=visits|shipments]  (default port 8080)
//
// Saves all 40 pictures in docs/screenshots/, in this order: sign-in, home-buyer, members,
// loans-table, loan-page, home-fleet, approval-queue, catalog-models, model-editor,
// depots-settings, units, unit-detail, maintenance-conflict, home-proctor, visits-list,
// visit-candidates, visit-page, proctor-offers, proctor-credentials, proctor-availability,
// proctor-calendar, training-record, visit-settings-hospital, visit-settings-lender, buyer-search,
// unit-page, request-stepper-campus, request-stepper-units, request-stepper,
// request-stepper-conflict, deposit-due, provider-page, loan-confirmed, notifications,
// shipments-board, shipments-today, shipments-map, shipment-photos and maps-standin.
//
// The run changes the demo data the way a person would: it books one unit for the other demo
// hospital (the clash on request-stepper-conflict, cancelled straight after) and pays the
// deposit of the buyer's approved demo loan on the payments stand-in, and records the return
// inspection of the demo return awaiting it (two photos, one finding). Reset the demo data
// before running it again.
//
// Every page is checked for what it must show before it is taken, and for names of the demo
// scenario that were retired; the script says (and exits with 1) when the icon font is not
// applied, since the pictures would then show icon names as words.
/* global document, getComputedStyle, sessionStorage */
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { fileURLToPath } from 'node:url';
import { chromium } from '@playwright/test';
import retiredNames from '../guards/retired-names.cjs';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const outDir = path.join(root, 'docs/screenshots');
const args = process.argv.slice(2);
const baseUrl = (args.find((a) => !a.startsWith('--')) ?? 'http://127.0.0.1:8080').replace(
  /\/$/,
  '',
);
/**
 * `--only=visits` takes the proctoring pictures alone (they need only fresh demo visits);
 * `--only=shipments` the coordinator's shipment pictures alone (fresh demo shipments).
 */
const only = args.find((a) => a.startsWith('--only='))?.slice('--only='.length) ?? null;
const viewport = { width: 1280, height: 800 };
const demoPassword = 'evalon-demo';
/** The payments stand-in (its hosted payment page and its `/__fake` control API). */
const paymentsFakeUrl =
  process.env.EVALON_PAYMENTS_FAKE_URL ??
  `http://127.0.0.1:${process.env.EVALON_PAYMENTS_PORT ?? '12111'}`;

/** People of the demo data (server/src/demo/demo-data.ts). */
const buyer = { email: 'buyer@velmora.example', firstName: 'Dana' };
const otherBuyer = { email: 'buyer@orlenbach.example', firstName: 'Friederike' };
const fleet = { email: 'fleet@quorvel.example', firstName: 'Marcus' };
const coordinator = { email: 'coordinator@quorvel.example', firstName: 'Priya' };
const proctor = { email: 'proctor@proctors.example', firstName: 'Helena' };
/** People of the demo visits (server/src/demo/demo-proctors.ts). */
const travellingProctors = [
  { email: 'i.varga@proctors.example', firstName: 'Ilse' },
  { email: 'm.quintanar@proctors.example', firstName: 'Marisol' },
];
const trainee = { email: 'clinician@orlenbach.example', firstName: 'Jonas' };

/** Pages whose icons did not draw in the icon font. */
const problems = [];
/** Pictures taken in this run. */
const taken = [];

/** Waits until web fonts are in and nothing is loading, so the picture is the settled page. */
async function settle(page) {
  await page.evaluate(() => document.fonts.ready.then(() => undefined));
  await page.waitForFunction(() => !document.querySelector('mat-progress-bar'), null, {
    timeout: 15_000,
  });
  // A notice in the corner would hide part of the page; they close by themselves.
  await page
    .locator('mat-snack-bar-container')
    .first()
    .waitFor({ state: 'detached', timeout: 12_000 });
  // Where the page has icons, they must draw in the icon font, not as their ligature names.
  // Rows a table has just replaced are no longer in the page and have no style to read.
  const iconFonts = await page
    .locator('mat-icon')
    .evaluateAll((icons) =>
      icons.filter((icon) => icon.isConnected).map((icon) => getComputedStyle(icon).fontFamily),
    );
  return iconFonts.every((family) => family.includes('Material Symbols'));
}

async function shoot(page, file) {
  const iconsOk = await settle(page);
  if (!iconsOk) problems.push(file);
  const text = await page.evaluate(() => document.body.innerText);
  const retired = retiredNames.findRetiredName(text);
  if (retired) throw new Error(`${file}: the page shows the retired name "${retired.name}"`);
  const target = path.join(outDir, file);
  await page.screenshot({ path: target, animations: 'disabled', caret: 'hide' });
  taken.push(file);
  process.stdout.write(
    `saved ${path.relative(root, target)}${iconsOk ? '' : ' (icons not drawn)'}\n`,
  );
}

/** Waits for something the page must show; fails with what was missing. */
async function expectVisible(locator, what, timeout = 20_000) {
  try {
    await locator.first().waitFor({ state: 'visible', timeout });
  } catch {
    throw new Error(`expected the page to show ${what}`);
  }
}

/**
 * The pointer rests in the page's bottom-right corner and nothing keeps the keyboard focus, so
 * no button, row or step shows a hover or focus state.
 */
async function restPointer(page) {
  await page.mouse.move(viewport.width - 1, viewport.height - 1);
  await page.evaluate(() => document.activeElement?.blur());
}

/**
 * Scrolls so `locator` starts `offset` px below the top of the area that scrolls (the shell's
 * content area beside the navigation, or the window on pages without the shell).
 */
async function scrollToTop(locator, offset = 16) {
  await locator.first().evaluate((el, gap) => {
    let area = el.parentElement;
    while (
      area &&
      !(
        area.scrollHeight > area.clientHeight &&
        /auto|scroll/.test(getComputedStyle(area).overflowY)
      )
    ) {
      area = area.parentElement;
    }
    const scroller = area ?? document.scrollingElement;
    const top = area ? area.getBoundingClientRect().top : 0;
    scroller.scrollTop += el.getBoundingClientRect().top - top - gap;
  }, offset);
}

/** Scrolls the page and its content area back to the top. */
async function scrollPageToTop(page) {
  await page.evaluate(() => {
    for (const el of [
      document.scrollingElement,
      ...document.querySelectorAll('mat-sidenav-content'),
    ]) {
      if (el) el.scrollTop = 0;
    }
  });
}

/** Signs in through the form and waits for the person's Home. */
async function signIn(page, email, firstName) {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail address').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(demoPassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL(`${baseUrl}/`);
  await page
    .getByRole('heading', { level: 1, name: new RegExp(`, ${firstName}$`) })
    .waitFor({ timeout: 15_000 });
  await page.getByRole('region', { name: 'Your next steps' }).waitFor();
}

/** A fresh browser profile per person, so sessions and remembered choices never mix. */
async function withPerson(browser, run) {
  const context = await browser.newContext({ viewport, deviceScaleFactor: 1, locale: 'en-US' });
  try {
    await run(await context.newPage());
  } finally {
    await context.close();
  }
}

/** The side navigation link `name`, clicked. */
async function openFromNavigation(page, name) {
  await page
    .getByRole('navigation', { name: 'Main' })
    .getByRole('link', { name, exact: true })
    .click();
}

/** Day `date` as the date fields take it (M/D/YYYY) and as the API takes it (YYYY-MM-DD). */
function dayFormats(date) {
  const pad = (n) => String(n).padStart(2, '0');
  return {
    typed: `${date.getMonth() + 1}/${date.getDate()}/${date.getFullYear()}`,
    iso: `${date.getFullYear()}-${pad(date.getMonth() + 1)}-${pad(date.getDate())}`,
  };
}

/** Case days from the Monday at least `days` days from today, `length` days long. */
function caseDaysFrom(days, length) {
  const first = new Date();
  first.setDate(first.getDate() + days);
  while (first.getDay() !== 1) first.setDate(first.getDate() + 1);
  const last = new Date(first);
  last.setDate(last.getDate() + length - 1);
  return { from: dayFormats(first), to: dayFormats(last) };
}

/** The day `days` calendar days after `iso` (YYYY-MM-DD), in both formats. */
function dayAfter(iso, days) {
  const [y, m, d] = iso.split('-').map(Number);
  return dayFormats(new Date(y, m - 1, d + days));
}

/**
 * A changing API call as the signed-in person of `page`: the server wants the XSRF token of the
 * session back in a header (double-submit), as the web app sends it.
 */
async function apiPost(page, url, body) {
  const csrf = await page.request.get(`${baseUrl}/api/auth/csrf`);
  const { csrfToken } = await csrf.json();
  const response = await page.request.post(`${baseUrl}${url}`, {
    data: body,
    headers: { 'X-XSRF-TOKEN': csrfToken },
  });
  if (!response.ok()) {
    throw new Error(`POST ${url} answered ${response.status()}: ${await response.text()}`);
  }
  return response.json();
}

/** Fills the search form of Find equipment, runs it and waits for its results. */
async function searchEquipment(page, { category, campus, window: w }) {
  await page.getByRole('combobox', { name: 'Category' }).click();
  await page.getByRole('option', { name: category, exact: true }).click();
  await page.getByRole('combobox', { name: 'Your campus' }).click();
  await page.getByRole('option', { name: campus, exact: true }).click();
  // Both ends are emptied first: a new first day after the old last day would be refused.
  await page.getByLabel('First case day').fill('');
  await page.getByLabel('Last case day').fill('');
  await page.getByLabel('First case day').fill(w.from.typed);
  await page.getByLabel('Last case day').fill(w.to.typed);
  await page.getByRole('button', { name: 'Search', exact: true }).click();
  // The search lives in the address bar; the results are the ones for these days.
  await page.waitForURL(
    (url) => url.searchParams.get('from') === w.from.iso && url.searchParams.get('to') === w.to.iso,
  );
  await page.locator('section.results[aria-busy="false"]').waitFor({ timeout: 30_000 });
  await expectVisible(page.getByText(/can be there in time/), 'the search summary', 30_000);
}

// --- The hospital buyer: sign-in, Home, members, loans ------------------------------------

async function buyerBasics(page) {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByRole('heading', { level: 1, name: 'Sign in to Evalon' }).waitFor();
  await shoot(page, 'sign-in.png');

  await signIn(page, buyer.email, buyer.firstName);
  // The deposit of the approved demo loan is still open: the data is fresh.
  const depositStep = page.getByRole('link', { name: /Secure the deposit for EV-/ });
  try {
    await depositStep.first().waitFor({ timeout: 15_000 });
  } catch {
    throw new Error(
      'The buyer has no approved loan waiting for its deposit: reload the demo data ' +
        '(npm run demo:reset) and run the script again.',
    );
  }
  await shoot(page, 'home-buyer.png');

  await openFromNavigation(page, 'Members');
  await page.getByRole('heading', { level: 1, name: 'Members' }).waitFor();
  await page.getByRole('table').getByRole('row').nth(1).waitFor();
  await restPointer(page);
  await shoot(page, 'members.png');

  await openFromNavigation(page, 'Loans');
  await page.getByRole('heading', { level: 1, name: 'Loans' }).waitFor();
  const table = page.getByRole('table', { name: 'Loans of your hospital' });
  await expectVisible(table.getByRole('link', { name: /^EV-\d{4}-\d+$/ }), 'loan references');
  for (const state of ['Waiting for lender', 'Approved — deposit due', 'Declined', 'Cancelled']) {
    await expectVisible(table.getByText(state, { exact: true }), `a loan "${state}"`);
  }
  await expectVisible(
    page.getByRole('option', { name: /^Waiting for lender \(\d+\)$/ }),
    'state chips',
  );
  await restPointer(page);
  await shoot(page, 'loans-table.png');

  // The request still waiting for the lender: milestones, units, deposit estimate, documents.
  await table
    .getByRole('row')
    .filter({ hasText: 'Waiting for lender' })
    .getByRole('link', { name: /^EV-/ })
    .click();
  await expectVisible(
    page.getByRole('heading', { level: 1, name: /^EV-\d{4}-\d+$/ }),
    'the reference',
  );
  await expectVisible(
    page.getByRole('heading', { level: 2, name: 'Milestones' }),
    'the milestones',
  );
  await expectVisible(
    page.getByRole('heading', { level: 2, name: /^Units \(\d+\)$/ }),
    'the units',
  );
  await expectVisible(
    page.getByRole('heading', { level: 2, name: 'Deposit estimate' }),
    'the deposit',
  );
  await expectVisible(page.getByRole('heading', { level: 2, name: 'Documents' }), 'the documents');
  await expectVisible(page.getByRole('button', { name: 'Cancel loan' }), '"Cancel loan"');
  await restPointer(page);
  await shoot(page, 'loan-page.png');
}

// --- The lender's fleet manager ---------------------------------------------------------

async function fleetPages(page) {
  await signIn(page, fleet.email, fleet.firstName);
  await expectVisible(
    page.getByRole('region', { name: 'Your next steps' }).getByText(/loan requests? waiting/),
    'the waiting requests on Home',
  );
  await shoot(page, 'home-fleet.png');

  await openFromNavigation(page, 'Approvals');
  await page.getByRole('heading', { level: 1, name: 'Loan requests' }).waitFor();
  // The other hospital's robotic platform: one unit, its calendar and milestones.
  await page
    .getByRole('navigation', { name: 'Waiting loan requests' })
    .getByRole('button')
    .filter({ hasText: 'Klinikum Orlenbach' })
    .filter({ hasText: 'Quorvel R2 robotic platform' })
    .click();
  const detail = page.getByRole('region', { name: /^Request EV-/ });
  await expectVisible(
    detail.getByRole('heading', { level: 2, name: 'Klinikum Orlenbach' }),
    'the request',
  );
  await expectVisible(
    detail.getByText(/No clash with other holds|Clashes with/),
    'the clash check',
  );
  await expectVisible(detail.getByRole('grid'), 'the unit calendar');
  // The queue and the unit's calendar matter more here than the page's heading.
  await scrollToTop(page.locator('.queue-count'), 16);
  await restPointer(page);
  await shoot(page, 'approval-queue.png');

  await openFromNavigation(page, 'Catalog');
  await page.getByRole('heading', { level: 1, name: 'Catalog' }).waitFor();
  await expectVisible(page.getByText(/\d+ models · \d+ units/), 'the catalog summary');
  const tower = page.getByRole('link', { name: 'Quorvel V4 4K imaging tower', exact: true });
  await expectVisible(tower, 'the imaging tower');
  await restPointer(page);
  await shoot(page, 'catalog-models.png');

  await tower.click();
  await page.getByRole('heading', { level: 1, name: 'Quorvel V4 4K imaging tower' }).waitFor();
  await page.waitForFunction(
    () => document.querySelector('input[formcontrolname="name"]')?.value,
    null,
    { timeout: 15_000 },
  );
  await expectVisible(
    page.getByRole('heading', { level: 2, name: 'Packing list' }),
    'the packing list',
  );
  await expectVisible(
    page.getByText(/One unit on loan would need a deposit of/),
    'the deposit preview',
  );
  await scrollToTop(page.getByRole('heading', { level: 2, name: 'Value and deposit' }), 40);
  await restPointer(page);
  await shoot(page, 'model-editor.png');

  await page.getByRole('link', { name: 'All models' }).click();
  await page.getByRole('link', { name: 'Depots and shipping' }).click();
  await page.getByRole('heading', { level: 1, name: 'Depots and shipping' }).waitFor();
  const depots = page.getByRole('list', { name: 'Your depots' }).getByRole('listitem');
  await expectVisible(depots.filter({ hasText: 'Quorvel Europe Depot' }), 'the depots');
  await expectVisible(page.getByText('Transit time by distance'), 'the shipping settings');
  await restPointer(page);
  await shoot(page, 'depots-settings.png');

  await openFromNavigation(page, 'Units');
  await page.getByRole('heading', { level: 1, name: 'Units' }).waitFor();
  await expectVisible(page.getByText(/\d+ units · \d+ available/), 'the units summary');
  await expectVisible(
    page
      .getByRole('table', { name: 'Units of your fleet' })
      .getByRole('link', { name: 'QC11-0001' }),
    'the first unit',
  );
  await page.waitForFunction(() => !document.body.innerText.includes('Looking up…'), null, {
    timeout: 15_000,
  });
  await restPointer(page);
  await shoot(page, 'units.png');

  await openUnit(page, 'QV4-0001');
  const holds = page.getByRole('list', { name: 'Current and coming holds' });
  await expectVisible(
    holds.getByText('Maintenance: Monitor panel replacement'),
    'the maintenance hold',
  );
  await expectVisible(
    page.getByRole('grid', { name: /^Calendar of unit QV4-0001/ }),
    'the calendar',
  );
  await restPointer(page);
  await shoot(page, 'unit-detail.png');

  // Maintenance over days a loan already holds: the dialog names the clash.
  await openFromNavigation(page, 'Units');
  await openUnit(page, 'QR2-0004');
  const unitId = new URL(page.url()).pathname.split('/').pop();
  const today = dayFormats(new Date()).iso;
  const response = await page.request.get(
    `${baseUrl}/api/units/${unitId}/holds?from=${today}&to=${dayAfter(today, 120).iso}`,
  );
  const loanHold = (await response.json()).items.find((h) => h.kind === 'loan');
  if (!loanHold) throw new Error('QR2-0004 has no loan hold: is the demo data fresh?');
  await page.getByRole('button', { name: 'Block for maintenance' }).click();
  const dialog = page.getByRole('dialog', { name: 'Block unit QR2-0004 for maintenance' });
  await dialog.getByPlaceholder('First day').fill(dayAfter(loanHold.start, 5).typed);
  await dialog.getByPlaceholder('Last day').fill(dayAfter(loanHold.start, 8).typed);
  await dialog.getByLabel('Reason').fill('Firmware update and arm calibration');
  await dialog.getByRole('button', { name: 'Block these days' }).click();
  await expectVisible(dialog.getByText('These days clash with another hold'), 'the clash');
  await expectVisible(dialog.getByText(loanHold.loanReference), 'the loan that holds the unit');
  await restPointer(page);
  await shoot(page, 'maintenance-conflict.png');
  await dialog.getByRole('button', { name: 'Cancel' }).click();
}

/** From the units list: the unit with serial number `serial`. */
async function openUnit(page, serial) {
  await page.getByLabel('Filter by serial, UDI or model').fill(serial);
  await page.getByRole('link', { name: serial, exact: true }).click();
  await page.getByRole('heading', { level: 1, name: `Unit ${serial}` }).waitFor();
}

// --- The buyer finds equipment and requests a loan ---------------------------------------

async function buyerRequest(browser, page) {
  await signIn(page, buyer.email, buyer.firstName);
  await openFromNavigation(page, 'Find equipment');
  await page.getByRole('heading', { level: 1, name: 'Find equipment' }).waitFor();
  const campus = 'Velmora East Campus';
  await searchEquipment(page, {
    category: 'Flexible endoscope',
    campus,
    window: caseDaysFrom(10, 3),
  });

  await page.getByRole('button', { name: 'Add to request' }).first().click();
  const tray = page.getByRole('complementary', { name: 'Your request' });
  await expectVisible(tray.getByText('1 unit in your request'), 'the request tray');
  await restPointer(page);
  await shoot(page, 'buyer-search.png');
  await tray.getByRole('button', { name: 'Clear' }).click();

  // One unit's page, from its serial number in the results: where it comes from, its calendar.
  await page.getByRole('link', { name: /^Unit QU75-0001, / }).click();
  await page
    .getByRole('heading', { level: 1, name: 'Quorvel U75 7.5 Fr digital ureteroscope' })
    .waitFor();
  await expectVisible(page.getByText('Can be there for these dates'), 'the fit for the case days');
  await expectVisible(
    page.getByRole('heading', { level: 2, name: 'Base depot' }),
    'the base depot',
  );
  await expectVisible(
    page.locator('.map-frame [aria-label="Quorvel East Depot"]'),
    'the depot pin',
  );
  await expectVisible(page.locator(`.map-frame [aria-label="${campus}"]`), 'the campus pin');
  await expectVisible(page.getByText(/km great-circle distance/), 'the distance');
  const calendar = page.getByRole('grid', { name: /^Calendar of unit QU75-0001/ });
  await expectVisible(calendar, 'the calendar');
  await expectVisible(calendar.locator('td.highlighted'), 'the days the case days need');
  // The map and the calendar are what this page adds to the search; the heading gives way.
  await scrollToTop(page.getByRole('heading', { level: 2, name: 'Where it comes from' }), 40);
  await restPointer(page);
  await shoot(page, 'unit-page.png');

  await openFromNavigation(page, 'Find equipment');
  await page.getByRole('heading', { level: 1, name: 'Find equipment' }).waitFor();

  // A fresh request: the robotic platform, with an instrument set added in the stepper.
  const requestDays = caseDaysFrom(56, 3);
  await searchEquipment(page, { category: 'Robotic platform', campus, window: requestDays });
  await page
    .locator('mat-card')
    .filter({ has: page.getByRole('heading', { level: 3, name: 'Quorvel R2 robotic platform' }) })
    .getByRole('button', { name: 'Add to request' })
    .first()
    .click();
  await page.getByRole('link', { name: 'Review request' }).click();
  await page.getByRole('heading', { level: 1, name: 'Request a loan' }).waitFor();
  await expectVisible(page.getByText('Boston, US · receiving'), 'the campus hint');
  await restPointer(page);
  await shoot(page, 'request-stepper-campus.png');

  await page.getByRole('button', { name: 'Next: units' }).click();
  await expectVisible(page.getByText(/Fits · arrives by/), 'the unit check', 30_000);
  await expectVisible(
    page.getByRole('heading', {
      level: 3,
      name: 'Compatible with your units: add what your cases need',
    }),
    'the compatible equipment',
  );
  await page
    .getByRole('button', { name: /^Add Quorvel R2 starter instrument set QR2S-/ })
    .first()
    .click();
  await expectVisible(
    page.getByRole('heading', { level: 3, name: 'In this request (2, from Quorvel Surgical)' }),
    'two units in the request',
  );
  await page.waitForFunction(
    () => document.querySelectorAll('ul.chosen .fit.ok').length === 2,
    null,
    { timeout: 30_000 },
  );
  await scrollPageToTop(page);
  await restPointer(page);
  await shoot(page, 'request-stepper-units.png');

  await page.getByRole('button', { name: 'Next: review' }).click();
  await expectVisible(
    page.getByRole('heading', { level: 3, name: 'Milestones of each unit' }),
    'the review',
  );
  await page.waitForFunction(
    () => document.querySelectorAll('.review ev-milestone-timeline').length === 2,
    null,
    { timeout: 30_000 },
  );
  await scrollPageToTop(page);
  await restPointer(page);
  await shoot(page, 'request-stepper.png');

  // Meanwhile the other demo hospital books the same robotic platform for the same days.
  const draft = await page.evaluate(() => JSON.parse(sessionStorage.getItem('evalon.loanDraft')));
  const platform = draft.units.find((u) => u.modelName === 'Quorvel R2 robotic platform');
  let clashing = null;
  await withPerson(browser, async (other) => {
    await signIn(other, otherBuyer.email, otherBuyer.firstName);
    const sites = await (await other.request.get(`${baseUrl}/api/sites`)).json();
    const site = sites.items.find((s) => s.name === 'Orlenbach Hauptstandort');
    const { loan } = await apiPost(other, '/api/loans', {
      siteId: site.id,
      unitIds: [platform.unitId],
      useFrom: requestDays.from.iso,
      useTo: requestDays.to.iso,
    });
    clashing = loan;
  });

  await page.getByRole('button', { name: 'Send request' }).click();
  const conflicts = page.getByRole('heading', {
    level: 3,
    name: 'Not sent: some units are no longer free',
  });
  await expectVisible(conflicts, 'the refusal', 30_000);
  await expectVisible(page.getByText('Booked by another hospital'), 'why the unit is not free');
  await expectVisible(page.getByRole('button', { name: 'Swap in' }), 'units to swap in');
  // The summary of the request stays in view above the refusal.
  await scrollToTop(conflicts, 110);
  await restPointer(page);
  await shoot(page, 'request-stepper-conflict.png');

  // The other hospital withdraws its request, so the demo keeps its own loans only.
  await withPerson(browser, async (other) => {
    await signIn(other, otherBuyer.email, otherBuyer.firstName);
    await apiPost(other, `/api/loans/${clashing.id}/cancel`, {
      reason: 'Booked to show a clash in the user guide.',
    });
  });
}

// --- The buyer secures the deposit of the approved demo loan ------------------------------

/**
 * The payments stand-in sends its webhooks to the endpoints it knows; add this server's when it
 * is missing (it knows port 8080's by default). The loan page also asks the server to check the
 * payment on return, so the picture does not depend on which arrives first.
 */
async function ensureWebhookEndpoint() {
  const endpoints = `${paymentsFakeUrl}/__fake/webhook-endpoints`;
  const url = `${baseUrl}/api/webhooks/payments`;
  const known = await (await fetch(endpoints)).json();
  if (known.data?.some((e) => e.url === url)) return;
  const response = await fetch(endpoints, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({
      url,
      secret: process.env.EVALON_PAYMENTS_WEBHOOK_SECRET ?? 'whsec_evalon_local',
    }),
  });
  if (response.status !== 201)
    throw new Error(`registering the webhook endpoint: ${response.status}`);
}

async function buyerDeposit(page) {
  await ensureWebhookEndpoint();
  await signIn(page, buyer.email, buyer.firstName);
  const depositStep = page.getByRole('link', { name: /Secure the deposit for EV-/ });
  const reference = (await depositStep.first().textContent()).match(/EV-\d{4}-\d+/)[0];
  await depositStep.first().click();
  await page.getByRole('heading', { level: 1, name: reference }).waitFor();
  await expectVisible(page.getByText('Approved — deposit due', { exact: true }), 'the state');
  await expectVisible(
    page.getByRole('heading', { level: 2, name: 'Secure the deposit' }),
    'the deposit step',
  );
  await expectVisible(page.getByText(/due in \d+ (days?|hours?)/), 'the deadline');
  await expectVisible(page.locator('.strategy-label'), 'how the card secures it');
  await restPointer(page);
  await shoot(page, 'deposit-due.png');

  const loanPath = new URL(page.url()).pathname;
  await page.getByRole('button', { name: 'Pay by card' }).click();
  await page.waitForURL(
    new RegExp(`^${paymentsFakeUrl.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}/pay/`),
    {
      timeout: 20_000,
    },
  );
  await expectVisible(page.getByText(`Refundable deposit for loan ${reference}`), 'what is paid');
  await page.getByRole('button', { name: 'Test card that succeeds' }).click();
  const cardNumber = page.getByLabel('Card number');
  for (let i = 0; i < 50 && !(await cardNumber.inputValue()); i++) await page.waitForTimeout(100);
  if (!(await cardNumber.inputValue())) throw new Error('the test card was not filled in');
  // The quick fill moves focus to "Pay"; the picture shows the page from its top.
  await scrollPageToTop(page);
  await restPointer(page);
  await shoot(page, 'provider-page.png');

  await page.getByRole('button', { name: /^Pay / }).click();
  await page.waitForURL(`${baseUrl}${loanPath}`, { timeout: 20_000 });
  await expectVisible(
    page.getByText(`Payment received: ${reference} is confirmed`),
    'the confirmation',
    30_000,
  );
  await expectVisible(page.locator('ev-loan-payments .chip').getByText('Charged'), 'the charge');
  await restPointer(page);
  await shoot(page, 'loan-confirmed.png');
}

// --- The lender's coordinator hears about it ----------------------------------------------

async function coordinatorBell(page) {
  await signIn(page, coordinator.email, coordinator.firstName);
  const bell = page.getByRole('button', { name: /^Notifications, \d+ unread$/ });
  await expectVisible(bell, 'unread notifications');
  await bell.click();
  await expectVisible(
    page.getByRole('menuitem', { name: /Loan EV-\d{4}-\d+ confirmed/ }),
    'the confirmation',
  );
  await shoot(page, 'notifications.png');
  await page.keyboard.press('Escape');
}

// --- The coordinator's shipments --------------------------------------------------------------

/**
 * A made-up photo as PNG (ISO/IEC 15948: signature, IHDR, one zlib IDAT with filter byte 0 per
 * row, IEND, CRC-32 per chunk): a shaded bench, a dark case and a lighter part on it, so the
 * thumbnails look like photos of a device, not like flat swatches.
 */
function photoPng(width, height, accent) {
  const chunk = (type, data) => {
    const length = Buffer.alloc(4);
    length.writeUInt32BE(data.length);
    const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
    const crc = Buffer.alloc(4);
    crc.writeUInt32BE(zlib.crc32(body));
    return Buffer.concat([length, body, crc]);
  };
  const header = Buffer.alloc(13);
  header.writeUInt32BE(width, 0);
  header.writeUInt32BE(height, 4);
  header[8] = 8; // bit depth
  header[9] = 2; // RGB
  const rows = [];
  for (let y = 0; y < height; y++) {
    const row = [0];
    for (let x = 0; x < width; x++) {
      const shade = 150 + Math.round((60 * (x + y)) / (width + height));
      let px = [shade, shade + 4, shade + 10];
      const inCase = x > width * 0.18 && x < width * 0.82 && y > height * 0.3 && y < height * 0.85;
      if (inCase) px = [58, 64, 72];
      const onPart = inCase && Math.abs(y - height * 0.58 - (x - width / 2) * 0.35) < height * 0.05;
      if (onPart) px = accent;
      row.push(...px);
    }
    rows.push(Buffer.from(row));
  }
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', header),
    chunk('IDAT', zlib.deflateSync(Buffer.concat(rows))),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

/**
 * The coordinator's board of the demo shipments, today's work (legs arriving back), the map of
 * legs with the carrier, and a return inspection recorded with two photos.
 */
async function coordinatorShipments(page) {
  await signIn(page, coordinator.email, coordinator.firstName);
  await openFromNavigation(page, 'Shipments');
  await expectVisible(page.getByRole('heading', { level: 1, name: 'Shipments' }), 'the board');
  await expectVisible(page.getByRole('row').nth(1), 'shipment rows');
  await expectVisible(page.getByText('Overdue', { exact: true }), 'the overdue demo leg');
  await restPointer(page);
  await shoot(page, 'shipments-board.png');

  await page.getByRole('button', { name: /Arriving back/ }).click();
  await expectVisible(page.getByText(/-R1/), 'the return on its way back');
  await restPointer(page);
  await shoot(page, 'shipments-today.png');

  await page.getByRole('link', { name: 'Map of shipments in transit' }).click();
  await expectVisible(page.getByRole('list', { name: 'Shipments in transit' }), 'the list');
  // The route dots are small; they are there once the stand-in has put its marker elements in.
  await page
    .waitForFunction(() => document.querySelectorAll('evalon-offline-marker').length > 30, null, {
      timeout: 20_000,
    })
    .catch(() => {
      throw new Error('expected the page to show the routes on the map');
    });
  await restPointer(page);
  await shoot(page, 'shipments-map.png');

  // The demo return awaiting inspection: two photos for one finding, then the inspection.
  await page.goto(`${baseUrl}/shipments`);
  await page.getByRole('button', { name: /To inspect/ }).click();
  await page.getByRole('link', { name: /-R1$/ }).first().click();
  await expectVisible(page.getByText('Return inspection', { exact: true }), 'the inspection');
  await page.getByRole('button', { name: 'Add finding' }).click();
  await page.getByLabel('Finding').fill('Scratched housing beside the light-guide port');
  await page.getByLabel('Inspection photo files, row 1').setInputFiles([
    { name: 'housing.png', mimeType: 'image/png', buffer: photoPng(320, 240, [196, 120, 64]) },
    { name: 'port.png', mimeType: 'image/png', buffer: photoPng(320, 240, [210, 210, 200]) },
  ]);
  await expectVisible(
    page.getByRole('list', { name: 'Inspection photos, row 1' }).getByRole('img'),
    'the finding’s photos',
  );
  await page.getByRole('button', { name: 'Record inspection' }).click();
  await expectVisible(page.getByText('Inspection recorded.'), 'the inspection recorded');
  await expectVisible(
    page.getByRole('img', { name: /^Inspection photo: damage: Scratched housing/ }),
    'the inspection photos',
  );
  await scrollToTop(page.locator('.photos'), 120);
  await restPointer(page);
  await shoot(page, 'shipment-photos.png');
}

// --- The offline maps stand-in with the demo's sites ---------------------------------------

/**
 * A page of Evalon's origin that draws four demo sites with the maps script the server hands
 * out when no maps key is configured (`/maps/api/js`), the way the unit page uses it, with one
 * info window open. The page itself is made up here, not served by Evalon.
 */
async function mapsStandin(page) {
  await signIn(page, buyer.email, buyer.firstName);
  const sites = (await (await page.request.get(`${baseUrl}/api/sites`)).json()).items;
  const wanted = [
    'Velmora East Campus',
    'Velmora Lakefront Campus',
    'Quorvel West Depot',
    'Quorvel Europe Depot',
  ];
  const shown = wanted.map((name) => {
    const site = sites.find((s) => s.name === name);
    if (!site) throw new Error(`the demo site ${name} is missing`);
    return { title: site.name, position: { lat: site.latitude, lng: site.longitude } };
  });
  const config = await (await page.request.get(`${baseUrl}/api/config/maps`)).json();
  if (!config.offline)
    throw new Error('the server hands out the hosted maps script, not the stand-in');
  const harness = `${baseUrl}/__screenshots/maps-standin`;
  await page.route(harness, (route) =>
    route.fulfill({
      contentType: 'text/html; charset=utf-8',
      body: `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Maps stand-in</title>
<style>html,body{margin:0;height:100%;font-family:system-ui,'DejaVu Sans',sans-serif}#map{position:absolute;inset:0}</style>
</head><body><div id="map"></div><script>
const sites = ${JSON.stringify(shown)};
window.onMapsReady = () => {
  const { Map, Marker, InfoWindow, LatLngBounds } = google.maps;
  const map = new Map(document.getElementById('map'), { center: { lat: 40, lng: -40 }, zoom: 3 });
  const info = new InfoWindow();
  const bounds = new LatLngBounds();
  for (const site of sites) {
    const marker = new Marker({ map, position: site.position, title: site.title });
    marker.addListener('click', () => {
      const content = document.createElement('div');
      const name = document.createElement('strong');
      name.textContent = site.title;
      const coords = document.createElement('div');
      coords.textContent = site.position.lat.toFixed(2) + '°, ' + site.position.lng.toFixed(2) + '°';
      content.append(name, coords);
      info.setContent(content);
      info.open({ map, anchor: marker, shouldFocus: false });
    });
    bounds.extend(site.position);
  }
  map.fitBounds(bounds);
  document.body.dataset.ready = 'yes';
};
</script><script src="${config.scriptUrl}?callback=onMapsReady"></script></body></html>`,
    }),
  );
  await page.goto(harness);
  await page.waitForFunction(() => document.body.dataset.ready === 'yes', null, {
    timeout: 20_000,
  });
  for (const site of shown) {
    await expectVisible(page.locator(`[aria-label="${site.title}"]`), `the pin of ${site.title}`);
  }
  await page.locator('[aria-label="Velmora Lakefront Campus"]').click();
  await expectVisible(
    page.getByRole('dialog').getByText('Velmora Lakefront Campus'),
    'the info window',
  );
  await restPointer(page);
  await shoot(page, 'maps-standin.png');
}

// --- Proctoring visits: hospital, proctor, clinician and settings --------------------------

/** The hospital side: the visits list, the request form with its candidates, a visit page. */
async function hospitalVisits(page) {
  await signIn(page, buyer.email, buyer.firstName);
  await openFromNavigation(page, 'Proctoring');
  await page.getByRole('heading', { level: 1, name: 'Proctoring visits' }).waitFor();
  for (const state of ['Accepted', 'No proctor found', 'Cancelled', 'Completed']) {
    await expectVisible(
      page.getByRole('table').getByText(state, { exact: true }),
      `a visit "${state}"`,
    );
  }
  await restPointer(page);
  await shoot(page, 'visits-list.png');

  // The request form, filled the way the loan page fills it, and the ranked candidates.
  const sites = (await (await page.request.get(`${baseUrl}/api/sites`)).json()).items;
  const models = (await (await page.request.get(`${baseUrl}/api/models`)).json()).items;
  const site = sites.find((x) => x.name === 'Velmora East Campus');
  const model = models.find((x) => x.name === 'Quorvel R2 robotic platform');
  if (!site || !model) throw new Error('the demo campus or robotic platform is missing');
  const days = caseDaysFrom(77, 2);
  await page.goto(
    `${baseUrl}/visits/new?siteId=${site.id}&modelId=${model.id}&from=${days.from.iso}&to=${days.to.iso}`,
  );
  await page.getByRole('heading', { level: 1, name: 'Ask for a proctor' }).waitFor();
  await page.getByRole('button', { name: 'Find proctors' }).click();
  const eligible = page.getByRole('list', { name: 'Proctors who can come' });
  await expectVisible(eligible.getByText(/supervised cases on this model/), 'the reasons', 30_000);
  await expectVisible(
    page.getByRole('list', { name: 'Proctors who cannot come' }),
    'the excluded proctors',
  );
  await eligible.getByRole('checkbox').first().check();
  await scrollToTop(page.getByRole('list', { name: 'Proctors who can come' }), 120);
  await restPointer(page);
  await shoot(page, 'visit-candidates.png');
}

/** The other hospital's signed-off visit: timeline with a decline, cases and the sign-off. */
async function visitPage(page) {
  await signIn(page, otherBuyer.email, otherBuyer.firstName);
  await openFromNavigation(page, 'Proctoring');
  await page
    .getByRole('table')
    .getByRole('row')
    .filter({ hasText: 'Signed off' })
    .getByRole('link', { name: /^PV-/ })
    .click();
  await expectVisible(
    page.getByRole('heading', { level: 1, name: /^PV-\d{4}-\d{6}$/ }),
    'the reference',
  );
  const timeline = page.locator('.timeline');
  for (const step of ['Requested', 'Declined', 'Accepted', 'Case recorded', 'Signed off']) {
    await expectVisible(timeline.getByText(step, { exact: true }), `the step "${step}"`);
  }
  await expectVisible(page.getByRole('link', { name: /Record \(PDF\)/ }), 'the sign-off record');
  // The timeline is what this picture is for: each step at its own time.
  await scrollToTop(timeline, 24);
  await restPointer(page);
  await shoot(page, 'visit-page.png');
}

/** The proctor with an offer waiting: offers, credentials, availability with its exceptions. */
async function proctorPages(page) {
  await signIn(page, proctor.email, proctor.firstName);
  await openFromNavigation(page, 'Visit offers');
  await expectVisible(page.locator('mat-card[data-reference]').getByText(/left/), 'the countdown');
  await restPointer(page);
  await shoot(page, 'proctor-offers.png');

  await openFromNavigation(page, 'Credentials');
  await expectVisible(page.getByRole('cell', { name: 'Illinois medical licence' }), 'a licence');
  await restPointer(page);
  await shoot(page, 'proctor-credentials.png');

  await page.goto(`${baseUrl}/proctor/availability`);
  await expectVisible(
    page.getByRole('heading', { level: 2, name: 'Exceptions' }),
    'the exceptions',
  );
  await expectVisible(page.getByRole('gridcell').nth(55), 'the 8 weeks');
  await restPointer(page);
  await shoot(page, 'proctor-availability.png');
}

/**
 * A proctor with an accepted visit: the month of it, with its travel days when a demo proctor
 * has a visit far enough from home for them (otherwise the nearest accepted visit).
 */
async function proctorCalendar(browser) {
  let chosen = null;
  for (const person of travellingProctors) {
    await withPerson(browser, async (page) => {
      if (chosen?.visit.travelDays) return;
      await signIn(page, person.email, person.firstName);
      const me = (await (await page.request.get(`${baseUrl}/api/auth/me`)).json()).user.id;
      const visits = (await (await page.request.get(`${baseUrl}/api/visits?role=proctor`)).json())
        .items;
      const visit = visits
        .filter((v) => v.proctorId === me && v.state === 'accepted')
        .sort((a, b) => (b.travelDays ?? 0) - (a.travelDays ?? 0))[0];
      if (visit && (!chosen || visit.travelDays > (chosen.visit.travelDays ?? 0))) {
        chosen = { person, visit };
      }
    });
  }
  if (!chosen) throw new Error('no demo proctor has an accepted visit');
  await withPerson(browser, async (page) => {
    const { person, visit } = chosen;
    await signIn(page, person.email, person.firstName);
    await openFromNavigation(page, 'Calendar');
    await page.getByRole('heading', { level: 1, name: 'Calendar' }).waitFor();
    await expectVisible(page.getByRole('grid'), 'the month');
    for (let i = 0; i < 3; i++) {
      if (await page.locator(`td[data-date="${visit.from}"]`).count()) break;
      await page.getByRole('button', { name: 'Next month' }).click();
      await settle(page);
    }
    await expectVisible(page.getByRole('link', { name: new RegExp(visit.reference) }), 'the visit');
    if (visit.travelDays) await expectVisible(page.locator('td.travel'), 'the travel days');
    await scrollToTop(page.getByRole('grid'), 64);
    await restPointer(page);
    await shoot(page, 'proctor-calendar.png');
  });
}

/** A clinician signed off on the other hospital's visit: My training. */
async function trainingRecord(page) {
  await signIn(page, trainee.email, trainee.firstName);
  await openFromNavigation(page, 'My training');
  await page.getByRole('heading', { level: 1, name: 'My training' }).waitFor();
  await expectVisible(
    page.getByText(/Signed off · \d+ cases performed under supervision/),
    'the progress',
  );
  await expectVisible(page.getByRole('link', { name: /Record \(PDF\)/ }), 'the record');
  await restPointer(page);
  await shoot(page, 'training-record.png');
}

/** Visit settings of a hospital (sign-off threshold) and a lender (minimum per model). */
async function visitSettings(browser) {
  await withPerson(browser, async (page) => {
    await signIn(page, buyer.email, buyer.firstName);
    await openFromNavigation(page, 'Visit settings');
    await expectVisible(page.getByLabel('Cases before sign-off'), 'the threshold');
    await restPointer(page);
    await shoot(page, 'visit-settings-hospital.png');
  });
  await withPerson(browser, async (page) => {
    await signIn(page, fleet.email, fleet.firstName);
    await openFromNavigation(page, 'Visit settings');
    await expectVisible(
      page.getByRole('heading', { level: 2, name: 'Minimum supervised cases per model' }),
      'the models',
    );
    await expectVisible(page.getByText(/^Now \d+/), 'the minimum in force');
    await restPointer(page);
    await shoot(page, 'visit-settings-lender.png');
  });
}

async function main() {
  const startedAt = Date.now();
  fs.mkdirSync(outDir, { recursive: true });
  const browser = await chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking'],
  });
  const visitPictures = async () => {
    await withPerson(browser, hospitalVisits);
    await withPerson(browser, visitPage);
    await withPerson(browser, proctorPages);
    await proctorCalendar(browser);
    await withPerson(browser, trainingRecord);
    await visitSettings(browser);
  };
  try {
    if (only === 'visits') {
      await visitPictures();
    } else if (only === 'shipments') {
      await withPerson(browser, coordinatorShipments);
    } else {
      await withPerson(browser, buyerBasics);
      await withPerson(browser, fleetPages);
      await withPerson(browser, async (page) => {
        await signIn(page, proctor.email, proctor.firstName);
        await shoot(page, 'home-proctor.png');
      });
      await visitPictures();
      await withPerson(browser, (page) => buyerRequest(browser, page));
      await withPerson(browser, buyerDeposit);
      await withPerson(browser, coordinatorBell);
      await withPerson(browser, coordinatorShipments);
      await withPerson(browser, mapsStandin);
    }
  } finally {
    await browser.close();
  }
  process.stdout.write(
    `${taken.length} screenshots in ${((Date.now() - startedAt) / 1000).toFixed(0)} s\n`,
  );
  if (problems.length) {
    process.stderr.write(
      `Icons are drawn as words on ${problems.join(', ')}: the app's global stylesheet (icon ` +
        'font) is not applied. Fix that, rebuild and take the screenshots again.\n',
    );
    process.exitCode = 1;
  }
}

main().catch((error) => {
  process.stderr.write(`screenshots failed: ${error?.stack ?? error}\n`);
  process.exitCode = 1;
});
