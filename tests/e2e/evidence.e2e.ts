import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';
import { signIn } from './helpers';

/*
 * Evaluation cases on a delivered loan of the demo data (QR2S-0004 at Velmora East Campus): the
 * clinician records cases through the case form, one refused for a record number in the note,
 * and the figures appear as tables. The buyer reads them without the recording controls.
 */
const clinician = { email: 'clinician@velmora.example', name: 'Rafael Oyelaran' };
const buyer = { email: 'buyer@velmora.example', name: 'Dana Whitcombe' };
const serial = 'QR2S-0004';
const screenshots = path.resolve(__dirname, '../../docs/screenshots');

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

async function deliveredLoanId(page: Page): Promise<number> {
  const res = await page.request.get('/api/loans?state=delivered&limit=100');
  expect(res.ok()).toBe(true);
  const body = (await res.json()) as {
    items: { id: number; units: { serialNumber: string }[] }[];
  };
  const loan = body.items.find((l) => l.units.some((u) => u.serialNumber === serial));
  expect(loan, `a delivered demo loan of ${serial}`).toBeDefined();
  return loan!.id;
}

/** Fills the case form: times, a 2-diameter-equal target, energy time and a note. */
async function fillCase(page: Page, c: { operative: number; energy: number; note: string }) {
  const dialog = page.getByRole('dialog');
  await dialog.getByLabel('Procedure').click();
  await page.getByRole('option', { name: 'Ureteroscopic lithotripsy' }).click();
  await dialog.getByLabel('Set-up').fill('18');
  await dialog.getByLabel('Operative').fill(String(c.operative));
  await dialog.getByLabel('Energy-on (laser)').fill(String(c.energy));
  await dialog.getByLabel('Length').fill('12');
  await dialog.getByLabel('Width').fill('9');
  await dialog.getByLabel('Height').fill('8');
  await dialog.getByLabel('Note').fill(c.note);
}

test('a clinician records cases (one refused for a record number) and answers the survey; the buyer decides', async ({
  page,
}) => {
  test.setTimeout(180_000);
  await signIn(page, clinician.email, clinician.name);
  const loanId = await deliveredLoanId(page);
  await page.goto(`/loans/${loanId}`);
  const section = page.locator('ev-loan-evidence');
  await expect(section.getByRole('heading', { name: 'Evaluation cases' })).toBeVisible();
  await expect(
    section.getByText(/Case records are de-identified: do not enter patient names/),
  ).toBeVisible();
  await expect(section.getByText('No cases recorded yet')).toBeVisible();

  // First case: the note holds a record number, so the form refuses it and nothing is sent.
  await section.getByRole('button', { name: 'Record a case' }).click();
  const dialog = page.getByRole('dialog');
  await expect(dialog.getByText(/use the evaluation day number instead/)).toBeVisible();
  await fillCase(page, { operative: 96, energy: 14, note: 'MRN 4471123, smooth docking' });
  await dialog.getByRole('button', { name: 'Record case' }).click();
  await expect(
    dialog.getByText('Character 1 looks like a record number or other long number'),
  ).toBeVisible();
  await shoot(page, 'evidence-case-form.png');
  await dialog.getByLabel('Note').fill('Two stones, 12 Fr sheath, dusting at 0.4 J x 80 Hz');
  await dialog.getByRole('button', { name: 'Record case' }).click();
  await expect(dialog).toBeHidden();
  await expect(page.getByText('Case 1 is recorded.')).toBeVisible();

  // Three more cases, each a little faster.
  for (const [operative, energy] of [
    [84, 13],
    [75, 12],
    [71, 12],
  ] as const) {
    await section.getByRole('button', { name: 'Record a case' }).click();
    await fillCase(page, { operative, energy, note: 'No device issues' });
    await page.getByRole('dialog').getByRole('button', { name: 'Record case' }).click();
    await expect(page.getByRole('dialog')).toBeHidden();
  }

  const rows = section.locator('table.cases tr[mat-row]');
  await expect(rows).toHaveCount(4);
  // 12 × 9 × 8 mm: π/6 · 864 = 452.4 mm³; over 14 min: 32.3 mm³/min.
  await expect(rows.first()).toContainText('452');
  await expect(rows.first()).toContainText('32.3');
  await expect(section.getByRole('heading', { name: 'Evaluation figures' })).toBeVisible();
  await expect(section.getByText(/case \d of 4/)).toBeVisible();
  // A taller window for the pictures, so that each table shows whole.
  await page.setViewportSize({ width: 1280, height: 1000 });
  await page.getByRole('button', { name: 'Dismiss' }).click();
  await section.getByRole('heading', { name: 'Evaluation cases' }).scrollIntoViewIfNeeded();
  await shoot(page, 'evidence-cases.png');
  await section.getByRole('heading', { name: 'By clinician' }).scrollIntoViewIfNeeded();
  await shoot(page, 'evidence-figures.png');

  // The clinician answers the survey.
  const survey = section.locator('ev-evaluation-survey');
  const groups = survey.getByRole('radiogroup');
  await expect(groups).toHaveCount(6);
  for (let i = 0; i < 6; i++) {
    await groups
      .nth(i)
      .getByRole('radio', { name: i === 3 ? /^3:/ : /^4:/ })
      .check();
  }
  await survey.getByLabel('Comment').fill('Clear view; the sheath exchange took practice');
  await survey.getByRole('button', { name: 'Send my answers' }).click();
  await expect(page.getByText('Your answers are saved.', { exact: false })).toBeVisible();
  await expect(section.getByText('1 clinician answered')).toBeVisible();

  // The buyer sees the same cases, without recording controls, and records the decision.
  await page.context().clearCookies();
  await signIn(page, buyer.email, buyer.name);
  await page.goto(`/loans/${loanId}`);
  await expect(page.locator('ev-loan-evidence table.cases tr[mat-row]')).toHaveCount(4);
  await expect(page.getByRole('button', { name: 'Record a case' })).toHaveCount(0);
  const decision = page.locator('ev-evaluation-decision');
  await decision.getByRole('button', { name: 'Record the decision' }).click();
  await expect(decision.getByText('Give at least one reason.')).toBeVisible();
  await decision.getByRole('radio', { name: 'Buy' }).check();
  await decision.getByRole('checkbox', { name: 'Clinical results in the evaluation' }).check();
  await decision.getByRole('checkbox', { name: 'Fit with our workflow' }).check();
  await decision.getByLabel('Note for the committee').fill('Recommend for the next capital round');
  await decision.getByRole('button', { name: 'Record the decision' }).click();
  await expect(page.getByText('Decision recorded: Buy.')).toBeVisible();
  await expect(decision.getByText(/Recorded: Buy by Dana Whitcombe/)).toBeVisible();
  await page.getByRole('button', { name: 'Dismiss' }).click();
  await page
    .locator('ev-loan-evidence')
    .getByRole('heading', { name: 'Clinician survey' })
    .scrollIntoViewIfNeeded();
  await shoot(page, 'evidence-survey-decision.png');

  // The report: three charts drawn, each with its summary sentence; the buyer revises the decision
  // there and downloads the PDF.
  await page
    .locator('ev-loan-evidence')
    .getByRole('link', { name: 'Open the evaluation report' })
    .click();
  await expect(page.getByRole('heading', { name: 'Evaluation report' })).toBeVisible();
  await expect(page.getByRole('note', { name: 'About this report' })).toContainText(
    'not clinical evidence for individual patients',
  );
  for (const key of ['operative-time', 'ablation-rate', 'survey']) {
    const chart = page.locator(`[data-chart="${key}"]`);
    await expect(chart).toHaveAttribute('aria-label', /\S/);
    // The chart library drew shapes (SVG paths) into the chart area.
    await expect.poll(() => chart.locator('svg path').count()).toBeGreaterThan(3);
  }
  await expect(page.getByText(/Operative time of 4 case\(s\)/).first()).toBeVisible();
  const reportDecision = page.locator('ev-evaluation-decision');
  await reportDecision.getByRole('radio', { name: 'Buy' }).check();
  await reportDecision
    .getByRole('checkbox', { name: 'Clinical results in the evaluation' })
    .check();
  await reportDecision
    .getByLabel('Note for the committee')
    .fill('Recommend for the next capital round; see report');
  await reportDecision.getByRole('button', { name: 'Record the decision' }).click();
  await expect(page.getByText('Decision recorded: Buy.')).toBeVisible();
  await page.getByRole('button', { name: 'Dismiss' }).click();
  await shoot(page, 'evidence-report.png');
  await page.locator('[data-chart="operative-time"]').scrollIntoViewIfNeeded();
  await shoot(page, 'evidence-report-charts.png');

  const [download] = await Promise.all([
    page.waitForEvent('download'),
    page.getByRole('link', { name: 'Download PDF' }).click(),
  ]);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'evalon-report-'));
  const pdf = path.join(dir, 'report.pdf');
  await download.saveAs(pdf);
  expect(fs.readFileSync(pdf).subarray(0, 5).toString()).toBe('%PDF-');
  // Pages to PNG (for people) and PPM (to count pixels) with Debian's pdftoppm (poppler-utils).
  execFileSync('pdftoppm', ['-r', '50', '-png', pdf, path.join(dir, 'page')]);
  execFileSync('pdftoppm', ['-r', '50', pdf, path.join(dir, 'raw')]);
  const pngs = fs.readdirSync(dir).filter((f) => f.endsWith('.png'));
  expect(pngs.length).toBeGreaterThanOrEqual(2);
  // Chart marks use the report palette's teal (#1d5e66) and brown (#8a4f1d): count such pixels.
  let chartPixels = 0;
  for (const f of fs.readdirSync(dir).filter((n) => n.endsWith('.ppm'))) {
    const buf = fs.readFileSync(path.join(dir, f));
    const header = buf.toString('latin1', 0, 40).split(/\s+/);
    const offset = buf.indexOf('\n', buf.indexOf('\n', buf.indexOf('\n') + 1) + 1) + 1;
    expect(header[0]).toBe('P6');
    for (let i = offset; i + 2 < buf.length; i += 3) {
      const [r, g, b] = [buf[i], buf[i + 1], buf[i + 2]];
      const teal = Math.abs(r - 0x1d) < 40 && Math.abs(g - 0x5e) < 40 && Math.abs(b - 0x66) < 40;
      const brown = Math.abs(r - 0x8a) < 40 && Math.abs(g - 0x4f) < 40 && Math.abs(b - 0x1d) < 40;
      if (teal || brown) chartPixels++;
    }
  }
  // Bars and points of three charts at 50 dpi cover thousands of pixels; titles alone far fewer.
  expect(chartPixels).toBeGreaterThan(3000);
  console.log(`report PDF: ${pngs.length} pages, ${chartPixels} chart-coloured pixels at 50 dpi`);
  if (process.env.EVALON_E2E_SCREENSHOTS) {
    fs.copyFileSync(
      path.join(dir, pngs.sort()[0]),
      path.join(screenshots, 'evidence-report-pdf-page-1.png'),
    );
  }
});
