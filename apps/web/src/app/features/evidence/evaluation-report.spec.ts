import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatSlideToggleHarness } from '@angular/material/slide-toggle/testing';
import { provideRouter } from '@angular/router';
import { reportCaution, type EvaluationReport } from '@evalon/contracts';
import {
  ablationRateChart,
  fitLearningCurve,
  loanMetrics,
  operativeTimeChart,
  quantileMethod,
  surveyChart,
} from '@evalon/evidence';
import { NGX_ECHARTS_CONFIG } from 'ngx-echarts';
import { errorInterceptor } from '../../core/interceptors';
import { EvaluationReportPage } from './evaluation-report';

// The chart library draws on a real canvas or SVG surface, which the test DOM lacks; a test
// double records what the page hands it instead.
const setOption = jest.fn();
const fakeChart = new Proxy(
  { setOption },
  { get: (t, k) => (k in t ? t[k as 'setOption'] : jest.fn()) },
);
const fakeLibrary = { init: jest.fn(() => fakeChart) };
// The test DOM has no ResizeObserver, which the chart directive uses to follow its box size.
if (!('ResizeObserver' in globalThis)) {
  Object.assign(globalThis, {
    ResizeObserver: class {
      observe(): void {}
      unobserve(): void {}
      disconnect(): void {}
    },
  });
}

/** A report as the server builds it, from the same package functions. */
function aReport(over: Partial<EvaluationReport> = {}): EvaluationReport {
  const minutes = [90, 75, 68, 62];
  const cases = minutes.map((m, i) => ({
    caseNumber: i + 1,
    clinicianId: 5,
    clinicianName: 'Mira Castellan',
    setupMinutes: 20,
    operativeMinutes: m,
    energyMinutes: 10,
    target: { lengthMm: 10, widthMm: 10, heightMm: 10 },
    proctored: false,
    ablationRateMm3PerMin: 52.36,
  }));
  const m = loanMetrics(cases);
  const fit = fitLearningCurve(
    minutes.map((o, i) => ({ caseNumber: i + 1, operativeMinutes: o })),
  )!;
  return {
    loan: {
      id: 3,
      reference: 'EV-2027-000003',
      state: 'returned',
      hospitalName: 'Velmora Health',
      lenderName: 'Quorvel Surgical',
      units: [{ modelName: 'Starter set', serialNumber: 'SN-1' }],
    },
    readAsLender: false,
    canDecide: true,
    sharing: { sharedWithLender: false, changedByName: null, changedAt: null },
    metrics: {
      ...m,
      quantileMethod,
      perClinician: m.perClinician.map((p) => ({ ...p, clinicianName: 'Mira Castellan' })),
      feedback: { responses: 0, items: [] },
      decision: null,
    },
    charts: [
      operativeTimeChart(cases, [{ clinicianId: 5, ...fit }]),
      ablationRateChart(cases),
      surveyChart([], 0),
    ],
    costs: {
      deposit: { amount: 250000, currency: 'USD' },
      securedAs: 'hold',
      settled: false,
      charges: [],
      kept: 0,
      returned: 0,
      uncovered: 0,
      proctorFees: [
        { reference: 'PV-1', state: 'completed', fee: { amount: 180000, currency: 'USD' } },
      ],
    },
    caution: reportCaution,
    ...over,
  };
}

describe('EvaluationReportPage', () => {
  let fixture: ComponentFixture<EvaluationReportPage>;
  let http: HttpTestingController;
  const el = () => fixture.nativeElement as HTMLElement;
  const text = () => (el().textContent ?? '').replace(/\s+/g, ' ');

  async function render(answer: EvaluationReport | { status: number }) {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: NGX_ECHARTS_CONFIG, useValue: { echarts: fakeLibrary } },
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(EvaluationReportPage);
    fixture.componentRef.setInput('id', '3');
    await fixture.whenStable();
    const req = http.expectOne('/api/loans/3/report');
    if ('status' in answer) {
      req.flush(
        { error: { code: 'loan_not_found', message: 'There is no such loan.' } },
        {
          status: answer.status,
          statusText: 'Not Found',
        },
      );
    } else {
      req.flush(answer);
    }
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  }

  afterEach(() => http.verify());

  it('shows the caution, each chart with its text alternative, figures, costs and downloads', async () => {
    await render(aReport());
    expect(text()).toContain('not clinical evidence for individual patients');
    const charts = [...el().querySelectorAll('[data-chart]')];
    expect(charts.map((c) => c.getAttribute('data-chart'))).toEqual([
      'operative-time',
      'ablation-rate',
      'survey',
    ]);
    // Every chart is an image whose name is its summary sentence, and the sentence is on screen.
    for (const c of charts) {
      expect(c.getAttribute('role')).toBe('img');
      expect(text()).toContain(c.getAttribute('aria-label')!);
    }
    expect(text()).toContain('Operative time of 4 case(s).');
    expect(text()).toContain('No clinician has answered the survey yet.');
    // Median of 62, 68, 75, 90 is 71.5; type 7 quartiles 66.5 and 78.75 (Hyndman & Fan 1996).
    expect(text()).toContain('71.5 (66.5–78.8)');
    expect(text()).toContain('$2,500.00 (secured as hold)');
    expect(text()).toContain('PV-1 (completed): $1,800.00');
    const pdf = el().querySelector('a[href="/api/loans/3/report.pdf"]');
    expect(pdf?.hasAttribute('download')).toBe(true);
    expect(el().querySelector('a[href="/api/loans/3/cases.csv"]')).not.toBeNull();
    expect(el().querySelector('ev-evaluation-decision')).not.toBeNull();
  });

  it('lets the buyer share the report with the lender', async () => {
    await render(aReport());
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const toggle = await loader.getHarness(MatSlideToggleHarness);
    expect(await toggle.isChecked()).toBe(false);
    await toggle.toggle();
    const req = http.expectOne('/api/loans/3/evidence-sharing');
    expect(req.request.method).toBe('PUT');
    expect(req.request.body).toEqual({ sharedWithLender: true });
    req.flush({
      sharing: { sharedWithLender: true, changedByName: 'Dana', changedAt: '2027-01-01T00:00:00Z' },
    });
    await fixture.whenStable();
    expect(await toggle.isChecked()).toBe(true);
  });

  it('reads as the lender: no decision form, no sharing switch, a note on pseudonyms', async () => {
    await render(aReport({ readAsLender: true, canDecide: false }));
    expect(el().querySelector('ev-evaluation-decision')).toBeNull();
    expect(el().querySelector('mat-slide-toggle')).toBeNull();
    expect(text()).toContain('The hospital shared this report with you.');
    expect(text()).toContain('The hospital’s buyer records the decision after the evaluation.');
  });

  it('shows an error with a way to try again', async () => {
    await render({ status: 404 });
    expect(text()).toContain('The report couldn’t be loaded');
    expect(text()).toContain('There is no such loan.');
    (el().querySelector('ev-empty-state button') as HTMLButtonElement).click();
    await fixture.whenStable();
    http.expectOne('/api/loans/3/report').flush(aReport());
    await fixture.whenStable();
    expect(el().querySelectorAll('[data-chart]')).toHaveLength(3);
  });
});
