import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter } from '@angular/router';
import {
  caseRecordCaution,
  type CaseList,
  type EvaluationCase,
  type LoanMetricsResponse,
} from '@evalon/contracts';
import { loanMetrics, quantileMethod } from '@evalon/evidence';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { membership, person } from '../../testing/people';
import { caseBodyFrom } from './case-dialog';
import { LoanEvidence, nextCaseNumber } from './loan-evidence';

const aCase = (over: Partial<EvaluationCase> = {}): EvaluationCase => ({
  id: 1,
  loanId: 3,
  caseNumber: 1,
  evaluationDay: 1,
  procedure: 'ureteroscopic_lithotripsy',
  unitIds: [11],
  clinicianId: 101,
  clinicianName: 'Dana Whitlock',
  setupMinutes: 22,
  operativeMinutes: 80,
  energyMinutes: 20,
  target: { lengthMm: 20, widthMm: 20, heightMm: 20 },
  outcome: 'complete',
  complicationGrade: '0',
  visitId: null,
  proctored: false,
  deviceIssues: null,
  note: null,
  recordedByUserId: 101,
  recordedByName: 'Dana Whitlock',
  targetVolumeMm3: 4188.790205,
  ablationRateMm3PerMin: 209.4395,
  createdAt: '2026-12-04T10:00:00.000Z',
  updatedAt: '2026-12-04T10:00:00.000Z',
  ...over,
});

const listOf = (items: EvaluationCase[], canRecord = true): CaseList => ({
  items,
  options: {
    procedures: ['ureteroscopic_lithotripsy', 'other'],
    units: [{ unitId: 11, label: 'Lithotripsy laser · SN-1' }],
    clinicians: [{ userId: 101, name: 'Dana Whitlock' }],
    visits: [],
  },
  canRecord,
  caution: caseRecordCaution,
});

/** The server's answer, computed with the same package the server uses. */
function metricsOf(items: EvaluationCase[]): LoanMetricsResponse {
  const m = loanMetrics(items.map((c) => ({ ...c, proctored: c.proctored })));
  return {
    ...m,
    quantileMethod,
    perClinician: m.perClinician.map((p) => ({ ...p, clinicianName: 'Dana Whitlock' })),
    feedback: { responses: 0, items: [] },
    decision: null,
  };
}

describe('LoanEvidence', () => {
  let fixture: ComponentFixture<LoanEvidence>;
  let loader: HarnessLoader;
  let http: HttpTestingController;
  const text = () =>
    ((fixture.nativeElement as HTMLElement).textContent ?? '').replace(/\s+/g, ' ');
  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  };

  async function render(items: EvaluationCase[], canRecord = true) {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(person([membership('velmora', 'clinician')]));
    fixture = TestBed.createComponent(LoanEvidence);
    fixture.componentRef.setInput('loanId', 3);
    fixture.componentRef.setInput('hospitalId', 7);
    fixture.componentRef.setInput('loanState', 'delivered');
    loader = TestbedHarnessEnvironment.documentRootLoader(fixture);
    await fixture.whenStable();
    http.expectOne('/api/loans/3/cases').flush(listOf(items, canRecord));
    http.expectOne('/api/loans/3/metrics').flush(metricsOf(items));
    await settle();
  }

  afterEach(() => http.verify());

  it('shows the caution and an empty state before the first case', async () => {
    await render([]);
    expect(text()).toContain('Case records are de-identified');
    expect(text()).toContain('No cases recorded yet');
    expect(text()).not.toContain('Evaluation figures');
  });

  it('lists cases with volume and rate, and the figures as tables', async () => {
    const items = [1, 2, 3].map((k) =>
      aCase({ id: k, caseNumber: k, operativeMinutes: [90, 70, 60][k - 1]! }),
    );
    await render(items);
    const rows = (fixture.nativeElement as HTMLElement).querySelectorAll('table.cases tr[mat-row]');
    expect(rows).toHaveLength(3);
    expect(rows[0]!.textContent).toContain('Ureteroscopic lithotripsy');
    expect(rows[0]!.textContent).toContain('4,189');
    expect(rows[0]!.textContent).toContain('209.4');
    // Operative minutes 60, 70, 90: median 70, type 7 quartiles 65 and 80.
    const operative = [
      ...(fixture.nativeElement as HTMLElement).querySelectorAll('table.summary-table tr[mat-row]'),
    ][1]!;
    expect([...operative.querySelectorAll('td')].map((td) => td.textContent!.trim())).toEqual([
      'Operative, min',
      '3',
      '70 (65–80)',
      // Sample SD of 60, 70, 90: √(((−13.3)² + (−3.3)² + 16.7²)/2) = 15.3.
      '73.3 ± 15.3',
      '60–90',
    ]);
    expect(text()).toContain('case 3 of 3');
    expect(text()).toContain('0 of 3');
  });

  it('refuses a note with a record number in the form before sending anything', async () => {
    await render([aCase()]);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Record a case/ }))).click();
    const field = async (name: string) =>
      loader.getHarness(MatInputHarness.with({ selector: `[formControlName="${name}"]` }));
    expect(await (await field('caseNumber')).getValue()).toBe('2');
    await (await field('setupMinutes')).setValue('15');
    await (await field('operativeMinutes')).setValue('65');
    await (await field('note')).setValue('MRN 4471123 went home');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Record case' }))).click();
    await settle();
    const dialogText = document.body.textContent ?? '';
    expect(dialogText).toContain('looks like a record number');
    http.expectNone('/api/loans/3/cases');

    await (await field('note')).setValue('Two 6 mm stones, 12 Fr sheath');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Record case' }))).click();
    const req = http.expectOne({ method: 'POST', url: '/api/loans/3/cases' });
    expect(req.request.body).toMatchObject({
      caseNumber: 2,
      setupMinutes: 15,
      operativeMinutes: 65,
      unitIds: [11],
      note: 'Two 6 mm stones, 12 Fr sheath',
      target: null,
    });
    expect(req.request.body).not.toHaveProperty('clinicianId');
    req.flush({ case: aCase({ id: 2, caseNumber: 2 }) });
    await settle();
    // Saved: the section reloads.
    http.expectOne('/api/loans/3/cases').flush(listOf([aCase(), aCase({ id: 2, caseNumber: 2 })]));
    http.expectOne('/api/loans/3/metrics').flush(metricsOf([aCase()]));
    await settle();
  });

  it('asks before removing a case and removes it only on confirmation', async () => {
    await render([aCase({ id: 9, caseNumber: 4 })]);
    const remove = () =>
      loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Remove case 4"]' }));
    await (await remove()).click();
    expect(document.body.textContent).toContain('Remove case 4?');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Cancel' }))).click();
    await settle();
    http.expectNone({ method: 'DELETE' });

    await (await remove()).click();
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Remove' }))).click();
    await settle();
    http.expectOne({ method: 'DELETE', url: '/api/loans/3/cases/9' }).flush(null);
    await settle();
    http.expectOne('/api/loans/3/cases').flush(listOf([]));
    http.expectOne('/api/loans/3/metrics').flush(metricsOf([]));
    await settle();
    expect(text()).toContain('No cases recorded yet');
  });

  it('hides recording for people who only read', async () => {
    await render([aCase()], false);
    expect(text()).not.toContain('Record a case');
    expect(
      (fixture.nativeElement as HTMLElement).querySelector('button[aria-label^="Remove"]'),
    ).toBeNull();
  });
});

describe('case form helpers', () => {
  it('numbers the next case one past the highest', () => {
    expect(nextCaseNumber([])).toBe(1);
    expect(nextCaseNumber([{ caseNumber: 4 }, { caseNumber: 2 }])).toBe(5);
  });

  it('sends a target only when a diameter was given, and a proctor’s clinician always', () => {
    const base = {
      caseNumber: 1,
      evaluationDay: 1,
      procedure: 'other',
      unitIds: [1],
      clinicianId: null,
      setupMinutes: 1,
      operativeMinutes: 2,
      energyMinutes: null,
      lengthMm: null,
      widthMm: 4,
      heightMm: null,
      outcome: null,
      complicationGrade: '0',
      visitId: null,
      deviceIssues: '  ',
      note: null,
    };
    expect(caseBodyFrom(base, true)).toMatchObject({
      target: { lengthMm: null, widthMm: 4, heightMm: null },
      deviceIssues: null,
    });
    expect(caseBodyFrom(base, true)).not.toHaveProperty('clinicianId');
    expect(caseBodyFrom(base, false)).toHaveProperty('clinicianId');
  });
});
