// The evaluation report, its PDF and CSV, and the hospital's consent to share them with the
// lender, against the real database.
import { reportCaution } from '@evalon/contracts';
import { startTestApp, type TestApp } from './helpers/app';
import { countRows } from './helpers/catalog';
import { makeEvidenceWorld, type EvidenceWorld } from './helpers/evidence';
import { signedInClient, type Client } from './helpers/http';
import { chartSvg } from '../src/evidence/domain/report-pdf';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
});
afterAll(() => t.close());

const sign = (person: { email: string; password: string }) =>
  signedInClient(t.app, person.email, person.password);
const send = (c: Client, method: 'post' | 'put', path: string, body: object = {}) =>
  c.agent[method](path).set('X-XSRF-TOKEN', c.csrf).send(body);

/** Four cases on y = 100·x^−0.5 (100, 70.7, 57.7, 50 min), a survey and the buyer's decision. */
async function evaluatedLoan(): Promise<EvidenceWorld & { lenderFleet: Client }> {
  const w = await makeEvidenceWorld(t.dataSource);
  const clinician = await sign(w.clinician);
  for (let k = 1; k <= 4; k++) {
    await send(clinician, 'post', `/api/loans/${w.loanId}/cases`, {
      caseNumber: k,
      evaluationDay: k,
      procedure: 'ureteroscopic_lithotripsy',
      unitIds: [w.unitIds[0]],
      setupMinutes: 20,
      operativeMinutes: Math.round(100 * k ** -0.5 * 10) / 10,
      energyMinutes: 10,
      target: { lengthMm: 10, widthMm: 10, heightMm: 10 },
      outcome: 'complete',
      complicationGrade: '0',
      // A formula-looking note (allowed by the de-identification guard) to test the CSV guard.
      note: k === 2 ? '=2+5 power setting' : null,
      deviceIssues: k === 3 ? '@fibre tip worn' : null,
    }).expect(201);
  }
  await send(clinician, 'post', `/api/loans/${w.loanId}/feedback`, {
    ratings: {
      setup: 4,
      handling: 5,
      visualisation: 4,
      ergonomics: 3,
      reliability: 5,
      would_use_again: 5,
    },
  }).expect(200);
  const buyer = await sign(w.buyer);
  await send(buyer, 'post', `/api/loans/${w.loanId}/decision`, {
    decision: 'buy',
    reasons: ['clinical_results', 'workflow_fit'],
  }).expect(200);
  // The visit's agreed fee and a settled deposit, as visits and payments would have stored them.
  await t.dataSource.query(
    `UPDATE visits SET fee_amount = 180000, fee_currency = 'USD' WHERE id = ?`,
    [w.visitId],
  );
  const now = new Date();
  await t.dataSource.query(
    `INSERT INTO payments (loan_id, provider, kind, status, amount, currency, amount_authorised,
       secures_loan, settled_at, settlement, created_at, updated_at)
     VALUES (?, 'processor', 'hold', 'captured', 250000, 'USD', 250000, 1, ?, ?, ?, ?)`,
    [
      w.loanId,
      now,
      JSON.stringify({
        loanId: w.loanId,
        paymentId: null,
        strategy: 'hold',
        currency: 'USD',
        kept: 35000,
        returned: 215000,
        uncovered: 0,
        allocations: [{ reason: 'Scratched sheath', amount: 35000, deducted: 35000, uncovered: 0 }],
      }),
      now,
      now,
    ],
  );
  return { ...w, lenderFleet: await sign(w.fleet) };
}

describe('evaluation report', () => {
  it('gives the buyer figures, charts with text, costs seen in Evalon and the decision', async () => {
    const w = await evaluatedLoan();
    const buyer = await sign(w.buyer);
    const res = await buyer.agent.get(`/api/loans/${w.loanId}/report`).expect(200);
    const r = res.body;
    expect(r.readAsLender).toBe(false);
    expect(r.canDecide).toBe(true);
    expect(r.caution).toBe(reportCaution);
    expect(r.caution).toMatch(/not clinical evidence for individual patients/);
    expect(r.metrics.cases).toBe(4);
    expect(r.charts.map((c: { key: string }) => c.key)).toEqual([
      'operative-time',
      'ablation-rate',
      'survey',
    ]);
    // Exact power law 100·x^−0.5 (times rounded to a tenth): the fit gives back a ≈ 100, b ≈ −0.5.
    const curve = r.metrics.perClinician[0].curve;
    expect(curve.a).toBeCloseTo(100, 0);
    expect(curve.b).toBeCloseTo(-0.5, 2);
    expect(r.charts[0].summary).toContain(`${w.clinician.name}: 4 cases`);
    // 10 mm sphere over 10 min: π/6·1000/10 = 52.36 mm³/min (geometry; docs/references.md).
    expect(r.charts[1].table.rows.map((row: unknown[]) => row[2])).toEqual([
      52.4, 52.4, 52.4, 52.4,
    ]);
    expect(r.charts[2].summary).toMatch(/^1 clinician\(s\) answered/);
    expect(r.costs).toEqual({
      deposit: { amount: 250000, currency: 'USD' },
      securedAs: 'hold',
      settled: true,
      charges: [{ reason: 'Scratched sheath', amount: 35000 }],
      kept: 35000,
      returned: 215000,
      uncovered: 0,
      proctorFees: [
        {
          reference: expect.any(String),
          state: 'accepted',
          fee: { amount: 180000, currency: 'USD' },
        },
      ],
    });
    expect(r.metrics.decision).toMatchObject({ decision: 'buy', decidedByName: w.buyer.name });
  });

  it('renders the PDF with the charts and the CSV with the injection guard', async () => {
    const w = await evaluatedLoan();
    const buyer = await sign(w.buyer);
    const started = Date.now();
    const pdf = await buyer.agent
      .get(`/api/loans/${w.loanId}/report.pdf`)
      .buffer(true)
      .parse((res, cb) => {
        const parts: Buffer[] = [];
        res.on('data', (c: Buffer) => parts.push(c));
        res.on('end', () => cb(null, Buffer.concat(parts)));
      })
      .expect(200);
    const ms = Date.now() - started;
    expect(pdf.headers['content-type']).toBe('application/pdf');
    const bytes = pdf.body as Buffer;
    expect(bytes.subarray(0, 5).toString()).toBe('%PDF-');
    const pages = bytes.toString('latin1').match(/\/Type \/Page\b/g) ?? [];
    expect(pages.length).toBeGreaterThanOrEqual(2);
    expect(ms).toBeLessThan(10_000); // a sanity bound only; the bench measures the time

    const csv = await buyer.agent.get(`/api/loans/${w.loanId}/cases.csv`).expect(200);
    expect(csv.headers['content-type']).toBe('text/csv; charset=utf-8');
    const lines = csv.text
      .replace(/^\uFEFF/, '')
      .trim()
      .split('\n');
    expect(lines).toHaveLength(5);
    expect(lines[0]).toMatch(/^case_number,evaluation_day,procedure,clinician,units_used,/);
    // OWASP CSV injection guidance (from memory): a leading = + - @ becomes text with a quote.
    expect(lines[2]).toContain(`'=2+5 power setting`);
    expect(lines[3]).toContain(`'@fibre tip worn`);
    expect(lines[1]).toContain(`1,1,`);
    expect(csv.text).not.toMatch(/,=|,@/);
  });

  it('draws the chart as SVG on the server: points and the fitted curve', async () => {
    const w = await evaluatedLoan();
    const buyer = await sign(w.buyer);
    const r = (await buyer.agent.get(`/api/loans/${w.loanId}/report`).expect(200)).body;
    const svg = chartSvg(r.charts[0]);
    expect(svg.startsWith('<svg')).toBe(true);
    expect(svg).toContain('Minutes');
    // Four scatter symbols and a dashed curve path at least.
    expect((svg.match(/<path/g) ?? []).length).toBeGreaterThan(8);
    expect(svg).toContain('stroke-dasharray');
  });
});

describe('sharing with the lender', () => {
  it('is the buyer’s consent, audited; the lender reads pseudonymised clinicians meanwhile', async () => {
    const w = await evaluatedLoan();
    const buyer = await sign(w.buyer);
    const clinician = await sign(w.clinician);
    const path = `/api/loans/${w.loanId}`;
    const before = await w.lenderFleet.agent.get(`${path}/report`);
    expect(before.status).toBe(403);
    expect(before.body.error.code).toBe('evidence_not_shared');
    await w.lenderFleet.agent.get(`${path}/report.pdf`).expect(403);
    await w.lenderFleet.agent.get(`${path}/cases.csv`).expect(403);

    // Only the buyer decides; bad input writes nothing.
    await send(clinician, 'put', `${path}/evidence-sharing`, { sharedWithLender: true }).expect(
      403,
    );
    const bad = await send(buyer, 'put', `${path}/evidence-sharing`, { sharedWithLender: 'yes' });
    expect(bad.status).toBe(422);
    expect(await countRows(t.dataSource, 'evaluation_sharing', 'loan_id = ?', [w.loanId])).toBe(0);

    const shared = await send(buyer, 'put', `${path}/evidence-sharing`, { sharedWithLender: true });
    expect(shared.status).toBe(200);
    expect(shared.body.sharing).toMatchObject({
      sharedWithLender: true,
      changedByName: w.buyer.name,
    });
    const audit = await countRows(t.dataSource, 'audit_events', 'subject = ? AND action = ?', [
      `loan:${w.loanId}`,
      'evidence.shared_with_lender',
    ]);
    expect(audit).toBe(1);

    const asLender = await w.lenderFleet.agent.get(`${path}/report`).expect(200);
    expect(asLender.body.readAsLender).toBe(true);
    expect(asLender.body.canDecide).toBe(false);
    expect(JSON.stringify(asLender.body)).not.toContain(w.clinician.name);
    expect(JSON.stringify(asLender.body)).not.toContain(w.buyer.name);
    expect(asLender.body.metrics.perClinician[0].clinicianName).toBe('Clinician 1');
    const csv = await w.lenderFleet.agent.get(`${path}/cases.csv`).expect(200);
    expect(csv.text).toContain('Clinician 1');
    expect(csv.text).not.toContain(w.clinician.name);
    // Case records themselves stay the hospital's.
    await w.lenderFleet.agent.get(`${path}/cases`).expect(403);

    await send(buyer, 'put', `${path}/evidence-sharing`, { sharedWithLender: false }).expect(200);
    await w.lenderFleet.agent.get(`${path}/report`).expect(403);
    expect(
      await countRows(t.dataSource, 'audit_events', 'subject = ? AND action = ?', [
        `loan:${w.loanId}`,
        'evidence.sharing_withdrawn',
      ]),
    ).toBe(1);
  });
});
