// Evaluation evidence against the real database: case records, metrics, surveys, the decision.
import { startTestApp, type TestApp } from './helpers/app';
import { countRows, makeHospital, places } from './helpers/catalog';
import { makeEvidenceWorld, type EvidenceWorld } from './helpers/evidence';
import { makePerson } from './helpers/factories';
import { signedInClient, type Client } from './helpers/http';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
});
afterAll(() => t.close());

const sign = (person: { email: string; password: string }) =>
  signedInClient(t.app, person.email, person.password);
const send = (c: Client, method: 'post' | 'patch' | 'delete', path: string, body: object = {}) =>
  c.agent[method](path).set('X-XSRF-TOKEN', c.csrf).send(body);

const caseBody = (w: EvidenceWorld, extra: object = {}) => ({
  caseNumber: 1,
  evaluationDay: 1,
  procedure: 'ureteroscopic_lithotripsy',
  unitIds: [w.unitIds[0]],
  setupMinutes: 22,
  operativeMinutes: 80,
  energyMinutes: 20,
  target: { lengthMm: 20, widthMm: 20, heightMm: 20 },
  outcome: 'complete',
  complicationGrade: '0',
  note: '2 x 8 mm stones, 12 Fr sheath, 30 W',
  ...extra,
});

const casesOf = (loanId: number) =>
  countRows(t.dataSource, 'evaluation_cases', 'loan_id = ?', [loanId]);
const auditOf = (loanId: number, action: string) =>
  countRows(t.dataSource, 'audit_events', 'subject LIKE ? AND action = ?', [
    `loan:${loanId}%`,
    action,
  ]);

describe('case records', () => {
  it('a clinician records a case; the answer adds volume and ablation rate', async () => {
    const w = await makeEvidenceWorld(t.dataSource);
    const clinician = await sign(w.clinician);
    const res = await send(clinician, 'post', `/api/loans/${w.loanId}/cases`, caseBody(w));
    expect(res.status).toBe(201);
    // 20 mm sphere: π/6 · 20³ = 4,188.79 mm³ (geometry; docs/references.md); ÷ 20 min = 209.44.
    expect(res.body.case.targetVolumeMm3).toBeCloseTo(4188.79, 2);
    expect(res.body.case.ablationRateMm3PerMin).toBeCloseTo(209.44, 2);
    expect(res.body.case).toMatchObject({
      caseNumber: 1,
      clinicianId: w.clinician.userId,
      clinicianName: w.clinician.name,
      proctored: false,
      visitId: null,
      recordedByUserId: w.clinician.userId,
    });
    const [row] = await t.dataSource.query(
      'SELECT clinician_user_id, operative_minutes, target_width_mm, note FROM evaluation_cases WHERE id = ?',
      [res.body.case.id],
    );
    expect(row).toMatchObject({
      clinician_user_id: w.clinician.userId,
      operative_minutes: '80.0',
      target_width_mm: '20.0',
      note: '2 x 8 mm stones, 12 Fr sheath, 30 W',
    });
    expect(await auditOf(w.loanId, 'evidence.case_recorded')).toBe(1);

    const list = await clinician.agent.get(`/api/loans/${w.loanId}/cases`).expect(200);
    expect(list.body.items).toHaveLength(1);
    expect(list.body.canRecord).toBe(true);
    expect(list.body.caution).toMatch(/de-identified/);
    expect(list.body.options.procedures).toContain('ureteroscopic_lithotripsy');
    expect(list.body.options.procedures).not.toContain('prostatectomy');
    expect(list.body.options.units.map((u: { unitId: number }) => u.unitId)).toEqual(w.unitIds);
    // The buyer reads but does not record.
    const buyer = await sign(w.buyer);
    const asBuyer = await buyer.agent.get(`/api/loans/${w.loanId}/cases`).expect(200);
    expect(asBuyer.body.canRecord).toBe(false);
    await send(
      buyer,
      'post',
      `/api/loans/${w.loanId}/cases`,
      caseBody(w, { caseNumber: 2 }),
    ).expect(403);
  });

  it.each([
    ['negative set-up minutes', { setupMinutes: -5 }, 'setupMinutes', /cannot be negative/],
    ['negative operative minutes', { operativeMinutes: -1 }, 'operativeMinutes', /negative/],
    [
      'a diameter of 0',
      { target: { lengthMm: 0, widthMm: 5, heightMm: 5 } },
      'target.lengthMm',
      /more than 0/,
    ],
    [
      'a diameter over 100 mm',
      { target: { lengthMm: 5, widthMm: 100.5, heightMm: 5 } },
      'target.widthMm',
      /at most 100/,
    ],
    [
      'energy time longer than the case',
      { energyMinutes: 90 },
      'energyMinutes',
      /cannot be longer/,
    ],
    ['a record number in the note', { note: 'MRN 00123456, smooth case' }, 'note', /record number/],
    ['a date in the note', { note: 'Operated 03/14/2026' }, 'note', /calendar date/],
    [
      'an e-mail in the device issues',
      { deviceIssues: 'Ask j.doe@clinic.example' },
      'deviceIssues',
      /e-mail/,
    ],
  ])('refuses %s with a field message and writes nothing', async (_l, extra, field, message) => {
    const w = await makeEvidenceWorld(t.dataSource);
    const clinician = await sign(w.clinician);
    const res = await send(clinician, 'post', `/api/loans/${w.loanId}/cases`, caseBody(w, extra));
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.details.fieldErrors[field].join(' ')).toMatch(message);
    expect(await casesOf(w.loanId)).toBe(0);
    expect(await auditOf(w.loanId, 'evidence.case_recorded')).toBe(0);
  });

  it('checks units, procedure, clinician and case number against the loan', async () => {
    const w = await makeEvidenceWorld(t.dataSource);
    const clinician = await sign(w.clinician);
    const path = `/api/loans/${w.loanId}/cases`;
    const unit = await send(clinician, 'post', path, caseBody(w, { unitIds: [w.otherUnitId] }));
    expect(unit.status).toBe(422);
    expect(unit.body.error.code).toBe('unknown_units');
    const proc = await send(clinician, 'post', path, caseBody(w, { procedure: 'prostatectomy' }));
    expect(proc.status).toBe(422);
    expect(proc.body.error.details.fieldErrors.procedure[0]).toMatch(
      /not a procedure for the equipment/,
    );
    const stranger = await makePerson(
      t.dataSource,
      (await makeHospital(t.dataSource, places.bostonCampus)).id,
      'clinician',
    );
    const who = await send(clinician, 'post', path, caseBody(w, { clinicianId: stranger.userId }));
    expect(who.status).toBe(422);
    expect(who.body.error.code).toBe('unknown_clinician');
    expect(await casesOf(w.loanId)).toBe(0);

    await send(clinician, 'post', path, caseBody(w)).expect(201);
    const again = await send(clinician, 'post', path, caseBody(w));
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('case_number_taken');
    expect(await casesOf(w.loanId)).toBe(1);
  });

  it('answers 404 to other organisations before reading the body, 403 to the lender', async () => {
    const w = await makeEvidenceWorld(t.dataSource);
    const other = await makeEvidenceWorld(t.dataSource);
    const outsider = await sign(other.clinician);
    const bad = await send(outsider, 'post', `/api/loans/${w.loanId}/cases`, { setupMinutes: -1 });
    expect(bad.status).toBe(404);
    expect(bad.body.error.code).toBe('loan_not_found');
    await outsider.agent.get(`/api/loans/${w.loanId}/metrics`).expect(404);
    await outsider.agent.get(`/api/loans/999999999/cases`).expect(404);
    // Another hospital's proctor (with a visit on a different loan) sees nothing here either.
    const otherProctor = await sign(other.proctor);
    await otherProctor.agent.get(`/api/loans/${w.loanId}/cases`).expect(404);
    const lender = await sign(w.coordinator);
    await lender.agent.get(`/api/loans/${w.loanId}/cases`).expect(403);
    expect(await casesOf(w.loanId)).toBe(0);
  });

  it('the proctor’s cases are proctored cases of a named clinician', async () => {
    const w = await makeEvidenceWorld(t.dataSource);
    const proctor = await sign(w.proctor);
    const path = `/api/loans/${w.loanId}/cases`;
    const nobody = await send(proctor, 'post', path, caseBody(w));
    expect(nobody.status).toBe(422);
    expect(nobody.body.error.code).toBe('clinician_required');
    const res = await send(
      proctor,
      'post',
      path,
      caseBody(w, { clinicianId: w.secondClinician.userId }),
    );
    expect(res.status).toBe(201);
    expect(res.body.case).toMatchObject({
      proctored: true,
      visitId: w.visitId,
      clinicianId: w.secondClinician.userId,
      recordedByUserId: w.proctor.userId,
    });
    const clinician = await sign(w.clinician);
    const own = await send(clinician, 'post', path, caseBody(w, { caseNumber: 2 }));
    expect(own.status).toBe(201);
    // The proctor changes their visit's case but not the clinician's own.
    await send(proctor, 'patch', `${path}/${res.body.case.id}`, { setupMinutes: 25 }).expect(200);
    const notTheirs = await send(proctor, 'patch', `${path}/${own.body.case.id}`, {
      setupMinutes: 1,
    });
    expect(notTheirs.status).toBe(403);
    await send(proctor, 'delete', `${path}/${own.body.case.id}`).expect(403);
    expect(await casesOf(w.loanId)).toBe(2);
    const list = await clinician.agent.get(path).expect(200);
    expect(list.body.items.map((c: { proctored: boolean }) => c.proctored)).toEqual([true, false]);
    expect(list.body.options.visits.map((v: { visitId: number }) => v.visitId)).toEqual([
      w.visitId,
    ]);
  });

  it('changes and removes a case, audited; refuses outside the evaluation', async () => {
    const w = await makeEvidenceWorld(t.dataSource);
    const clinician = await sign(w.clinician);
    const created = await send(clinician, 'post', `/api/loans/${w.loanId}/cases`, caseBody(w));
    const path = `/api/loans/${w.loanId}/cases/${created.body.case.id}`;
    const changed = await send(clinician, 'patch', path, {
      operativeMinutes: 70,
      energyMinutes: null,
    });
    expect(changed.status).toBe(200);
    expect(changed.body.case).toMatchObject({
      operativeMinutes: 70,
      energyMinutes: null,
      ablationRateMm3PerMin: null,
    });
    const tooLong = await send(clinician, 'patch', path, { energyMinutes: 75 });
    expect(tooLong.status).toBe(422);
    expect(tooLong.body.error.details.fieldErrors.energyMinutes).toBeDefined();
    const withName = await send(clinician, 'patch', path, { note: 'Patient Smith was calm' });
    expect(withName.status).toBe(422);
    const [row] = await t.dataSource.query(
      'SELECT operative_minutes, note FROM evaluation_cases WHERE id = ?',
      [created.body.case.id],
    );
    expect(row).toMatchObject({
      operative_minutes: '70.0',
      note: '2 x 8 mm stones, 12 Fr sheath, 30 W',
    });
    expect(await auditOf(w.loanId, 'evidence.case_changed')).toBe(1);

    await send(clinician, 'delete', path).expect(204);
    expect(await casesOf(w.loanId)).toBe(0);
    expect(await auditOf(w.loanId, 'evidence.case_removed')).toBe(1);
    await send(clinician, 'delete', path).expect(404);

    const early = await makeEvidenceWorld(t.dataSource, { state: 'approved' });
    const c2 = await sign(early.clinician);
    const res = await send(c2, 'post', `/api/loans/${early.loanId}/cases`, caseBody(early));
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('evaluation_not_open');
    expect(await casesOf(early.loanId)).toBe(0);
  });
});

describe('metrics, survey and decision', () => {
  it('computes the loan’s figures from the stored cases', async () => {
    const w = await makeEvidenceWorld(t.dataSource);
    const clinician = await sign(w.clinician);
    const proctor = await sign(w.proctor);
    const path = `/api/loans/${w.loanId}/cases`;
    // Clinician 1's five cases follow y = 120·x^−0.3 (rounded to a tenth as stored).
    for (let k = 1; k <= 5; k++) {
      const minutes = Math.round(120 * k ** -0.3 * 10) / 10;
      await send(
        clinician,
        'post',
        path,
        caseBody(w, {
          caseNumber: k,
          evaluationDay: Math.ceil(k / 2),
          operativeMinutes: minutes,
          energyMinutes: 10,
          target: { lengthMm: 10, widthMm: 10, heightMm: 10 },
          complicationGrade: k === 3 ? 'II' : '0',
        }),
      ).expect(201);
    }
    await send(
      proctor,
      'post',
      path,
      caseBody(w, {
        caseNumber: 6,
        clinicianId: w.secondClinician.userId,
        target: null,
        energyMinutes: null,
      }),
    ).expect(201);

    const res = await clinician.agent.get(`/api/loans/${w.loanId}/metrics`).expect(200);
    const m = res.body;
    expect(m.cases).toBe(6);
    expect(m.quantileMethod).toMatch(/type 7/);
    const first = m.perClinician.find(
      (p: { clinicianId: number }) => p.clinicianId === w.clinician.userId,
    );
    expect(first.n).toBe(5);
    expect(first.curve.b).toBeCloseTo(-0.3, 2);
    expect(first.curve.a).toBeCloseTo(120, 0);
    // 5 · 1.1^(1/−0.3) = 3.64 → case 4 (derived from the plateau definition in @evalon/evidence).
    expect(first.curve.plateauCase).toBe(4);
    expect(first.proctored).toEqual({
      proctoredCases: 0,
      threshold: 3,
      reached: false,
      remaining: 3,
    });
    const second = m.perClinician.find(
      (p: { clinicianId: number }) => p.clinicianId === w.secondClinician.userId,
    );
    expect(second).toMatchObject({ n: 1, curve: null, clinicianName: w.secondClinician.name });
    expect(second.proctored.proctoredCases).toBe(1);
    // 10 mm sphere: π/6 · 1000 = 523.6 mm³ over 10 min = 52.36 mm³/min, five cases.
    expect(m.volumes.n).toBe(5);
    expect(m.volumes.median).toBeCloseTo(523.6, 1);
    expect(m.ablationRates.median).toBeCloseTo(52.36, 2);
    expect(m.complications.find((c: { grade: string }) => c.grade === 'II').count).toBe(1);
    expect(m.complications.find((c: { grade: string }) => c.grade === '0').count).toBe(5);
    expect(m.feedback).toMatchObject({ responses: 0 });
    expect(m.decision).toBeNull();
  });

  it('takes each clinician’s survey once (revised on a second answer) and the buyer’s decision', async () => {
    const w = await makeEvidenceWorld(t.dataSource);
    const clinician = await sign(w.clinician);
    const second = await sign(w.secondClinician);
    const buyer = await sign(w.buyer);
    const ratings = {
      setup: 4,
      handling: 5,
      visualisation: 4,
      ergonomics: 3,
      reliability: 5,
      would_use_again: 5,
    };
    const bad = await send(clinician, 'post', `/api/loans/${w.loanId}/feedback`, {
      ratings: { ...ratings, setup: 0 },
    });
    expect(bad.status).toBe(422);
    expect(bad.body.error.details.fieldErrors['ratings.setup']).toEqual(['Choose 1 to 5.']);
    expect(await countRows(t.dataSource, 'evaluation_feedback', 'loan_id = ?', [w.loanId])).toBe(0);
    await send(clinician, 'post', `/api/loans/${w.loanId}/feedback`, {
      ratings: { ...ratings, setup: 2 },
    }).expect(200);
    await send(clinician, 'post', `/api/loans/${w.loanId}/feedback`, {
      ratings,
      comment: 'Smooth docking',
    }).expect(200);
    await send(second, 'post', `/api/loans/${w.loanId}/feedback`, {
      ratings: { ...ratings, setup: 2 },
    }).expect(200);
    await send(buyer, 'post', `/api/loans/${w.loanId}/feedback`, { ratings }).expect(403);
    expect(await countRows(t.dataSource, 'evaluation_feedback', 'loan_id = ?', [w.loanId])).toBe(2);

    const noReason = await send(buyer, 'post', `/api/loans/${w.loanId}/decision`, {
      decision: 'buy',
      reasons: [],
    });
    expect(noReason.status).toBe(422);
    await send(clinician, 'post', `/api/loans/${w.loanId}/decision`, {
      decision: 'buy',
      reasons: ['workflow_fit'],
    }).expect(403);
    const decided = await send(buyer, 'post', `/api/loans/${w.loanId}/decision`, {
      decision: 'not_now',
      reasons: ['budget_timing', 'clinical_results'],
      note: 'Revisit in the next budget cycle',
    });
    expect(decided.status).toBe(200);
    expect(decided.body.decision).toMatchObject({
      decision: 'not_now',
      decidedByUserId: w.buyer.userId,
    });
    await send(buyer, 'post', `/api/loans/${w.loanId}/decision`, {
      decision: 'buy',
      reasons: ['workflow_fit'],
    }).expect(200);
    expect(await countRows(t.dataSource, 'evaluation_decisions', 'loan_id = ?', [w.loanId])).toBe(
      1,
    );
    expect(await auditOf(w.loanId, 'evidence.decision_recorded')).toBe(2);

    const m = (await buyer.agent.get(`/api/loans/${w.loanId}/metrics`).expect(200)).body;
    expect(m.feedback.responses).toBe(2);
    const setup = m.feedback.items.find((i: { item: string }) => i.item === 'setup');
    expect(setup.summary).toMatchObject({ n: 2, median: 3, mean: 3 });
    expect(m.decision).toMatchObject({ decision: 'buy', reasons: ['workflow_fit'] });
  });
});
