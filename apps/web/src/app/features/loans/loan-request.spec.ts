import { ChangeDetectionStrategy, Component } from '@angular/core';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import {
  HttpTestingController,
  TestRequest,
  provideHttpClientTesting,
} from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatDateRangeInputHarness } from '@angular/material/datepicker/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSnackBarHarness } from '@angular/material/snack-bar/testing';
import { MatStepperHarness } from '@angular/material/stepper/testing';
import { Router, provideRouter, withComponentInputBinding } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import type { AvailabilityItem } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { formatWindow } from '../../shared/iso-date';
import { LOAN_DRAFT_KEY, LoanDraft, LoanDraftState, draftUnitOf } from '../../shared/loan-draft';
import {
  alternative,
  availabilityItem,
  availabilityResponse,
  future,
  loan,
  milestonesFor,
  scopeModel,
  sites,
  towerModel,
  typed,
} from '../../testing/marketplace';
import { membership, person } from '../../testing/people';
import { LoanRequest } from './loan-request';

@Component({ template: '', changeDetection: ChangeDetectionStrategy.OnPush })
class Blank {}

const useFrom = future(40);
const useTo = future(42);
const scope = availabilityItem({
  unitId: 5,
  serialNumber: 'MSU-0001',
  milestones: milestonesFor(useFrom, useTo),
});
const tower = availabilityItem({
  unitId: 30,
  serialNumber: 'MVT-0001',
  modelId: towerModel.id,
  modelName: towerModel.name,
  category: towerModel.category,
  deposit: { amount: 950_000, currency: 'USD' },
  milestones: milestonesFor(useFrom, useTo),
});
const spareScope = availabilityItem({
  unitId: 6,
  serialNumber: 'MSU-0002',
  milestones: milestonesFor(useFrom, useTo),
});

describe('LoanRequest', () => {
  let harness: RouterTestingHarness;
  let loader: HarnessLoader;
  let root: HarnessLoader;
  let http: HttpTestingController;

  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve));
    await harness.fixture.whenStable();
  };
  const text = () => (harness.routeNativeElement as HTMLElement).textContent ?? '';
  const isAvailability = (r: { url: string }) => r.url === '/api/availability';

  beforeEach(async () => {
    const draft: LoanDraftState = {
      siteId: 11,
      useFrom,
      useTo,
      units: [draftUnitOf(scope), draftUnitOf(tower)],
    };
    sessionStorage.setItem(LOAN_DRAFT_KEY, JSON.stringify(draft));
    TestBed.configureTestingModule({
      providers: [
        provideRouter(
          [
            { path: 'loans/new', component: LoanRequest },
            { path: 'loans/:id', component: Blank },
            { path: 'equipment', component: Blank },
          ],
          withComponentInputBinding(),
        ),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(person([membership('velmora', 'buyer')]));
    harness = await RouterTestingHarness.create();
  });

  afterEach(() => {
    http.verify();
    sessionStorage.removeItem(LOAN_DRAFT_KEY);
  });

  /**
   * Answers every pending availability check: each chosen model's units from `units`, and the
   * models compatible with them from `compatible`.
   */
  async function answerChecks(
    units: AvailabilityItem[] = [scope, tower],
    compatible: AvailabilityItem[] = [],
  ): Promise<TestRequest[]> {
    const requests = http.match(isAvailability);
    for (const request of requests) {
      const params = request.request.params;
      expect(params.get('siteId')).toBe('11');
      if (params.has('modelId')) {
        const modelId = Number(params.get('modelId'));
        request.flush(availabilityResponse(units.filter((u) => u.modelId === modelId)));
      } else {
        request.flush(availabilityResponse(compatible));
      }
    }
    await settle();
    return requests;
  }

  async function open(): Promise<void> {
    await harness.navigateByUrl('/loans/new');
    loader = TestbedHarnessEnvironment.loader(harness.fixture);
    root = TestbedHarnessEnvironment.documentRootLoader(harness.fixture);
    http.expectOne('/api/sites').flush({ items: sites });
    await settle();
    const checks = await answerChecks();
    // One check per chosen model, one compatibility look-up per chosen model.
    expect(checks.map((r) => r.request.params.toString()).sort()).toEqual(
      [
        `siteId=11&useFrom=${useFrom}&useTo=${useTo}&modelId=${scopeModel.id}`,
        `siteId=11&useFrom=${useFrom}&useTo=${useTo}&modelId=${towerModel.id}`,
        `siteId=11&useFrom=${useFrom}&useTo=${useTo}&compatibleWith=${scopeModel.id}`,
        `siteId=11&useFrom=${useFrom}&useTo=${useTo}&compatibleWith=${towerModel.id}`,
      ].sort(),
    );
  }

  async function click(label: RegExp): Promise<void> {
    await (await loader.getHarness(MatButtonHarness.with({ text: label }))).click();
    await settle();
  }

  async function selectedStep(): Promise<string> {
    const stepper = await loader.getHarness(MatStepperHarness);
    for (const step of await stepper.getSteps()) {
      if (await step.isSelected()) return step.getLabel();
    }
    return '';
  }

  async function goToReview(): Promise<void> {
    await click(/Next: units/);
    await click(/Next: review/);
    expect(await selectedStep()).toBe('Review and send');
  }

  it('starts from the chosen units, campus and case days', async () => {
    await open();
    const stepper = await loader.getHarness(MatStepperHarness);
    const labels = await Promise.all((await stepper.getSteps()).map((s) => s.getLabel()));
    expect(labels).toEqual(['Campus and case days', 'Units and accessories', 'Review and send']);
    const range = await loader.getHarness(MatDateRangeInputHarness);
    expect(await (await range.getStartInput()).getValue()).toBe(typed(useFrom));
    expect(await (await range.getEndInput()).getValue()).toBe(typed(useTo));
  });

  it('marks the units step done (Material shows its edit pencil) only once it has been opened', async () => {
    await open();
    const stepper = await loader.getHarness(MatStepperHarness);
    const [, units] = await stepper.getSteps();
    // The chosen units already fit, but the person has not seen the step yet.
    expect(await units!.isCompleted()).toBe(false);
    await click(/Next: units/);
    await click(/Next: review/);
    expect(await selectedStep()).toBe('Review and send');
    expect(await units!.isCompleted()).toBe(true);
  });

  it('offers compatible units on the units step and adds one', async () => {
    await harness.navigateByUrl('/loans/new');
    loader = TestbedHarnessEnvironment.loader(harness.fixture);
    http.expectOne('/api/sites').flush({ items: sites });
    await settle();
    const pump = availabilityItem({
      unitId: 40,
      serialNumber: 'MIP-0001',
      modelId: 6,
      modelName: 'Dralvik irrigation pump',
      category: 'fluid_management',
      milestones: milestonesFor(useFrom, useTo),
    });
    const busyPump = { ...pump, unitId: 41, serialNumber: 'MIP-0002', feasible: false };
    await answerChecks([scope, tower], [spareScope, pump, busyPump, { ...tower }]);
    await click(/Next: units/);
    expect(text()).toContain('Compatible with your units');
    // Offered: units of other models that fit. Not offered: more units of the chosen models,
    // and units that do not fit the days.
    expect(text()).toContain('MIP-0001');
    expect(text()).not.toContain('MIP-0002');
    expect(text()).not.toContain('MSU-0002');
    await click(/^add Add$/);
    expect(
      TestBed.inject(LoanDraft)
        .units()
        .map((u) => u.unitId),
    ).toEqual([5, 30, 40]);
    await answerChecks([scope, tower, pump]);
  });

  it('reviews each unit’s milestones, the deposit total and the cautions, then sends', async () => {
    await open();
    await goToReview();
    const review = text();
    expect(review).toContain('Velmora East Campus');
    expect(review).toContain(formatWindow(useFrom, useTo));
    // $5,600.00 + $9,500.00
    expect(review).toContain('$15,100.00');
    expect(
      harness.routeNativeElement!.querySelectorAll('.unit-review ev-milestone-timeline'),
    ).toHaveLength(2);
    expect(review).toContain(
      'Computed dates and deposits are estimates until the lender confirms them.',
    );
    expect(review).toContain(
      'used only by trained clinicians, following the manufacturer’s instructions for use',
    );
    expect(review).toContain(
      'Local regulations, contracts and licensed practice always come first.',
    );

    const note = await loader.getHarness(MatInputHarness.with({ selector: 'textarea' }));
    await note.setValue('  Two cases in OR 4.  ');
    await click(/Send request/);
    const post = http.expectOne({ method: 'POST', url: '/api/loans' });
    expect(post.request.body).toEqual({
      siteId: 11,
      unitIds: [5, 30],
      useFrom,
      useTo,
      note: 'Two cases in OR 4.',
    });
    post.flush(
      { loan: loan({ id: 77, reference: 'EV-2027-000077', state: 'requested' }) },
      { status: 201, statusText: 'Created' },
    );
    await settle();
    expect(TestBed.inject(Router).url).toBe('/loans/77');
    expect(TestBed.inject(LoanDraft).count()).toBe(0);
    const snack = await root.getHarness(MatSnackBarHarness);
    expect(await snack.getMessage()).toBe('Request EV-2027-000077 sent to Dralvik Medical Loans.');
  });

  describe('when the lender’s calendar changed meanwhile (409)', () => {
    const earliest = future(60);

    async function refused(): Promise<void> {
      await open();
      await goToReview();
      await (
        await loader.getHarness(MatInputHarness.with({ selector: 'textarea' }))
      ).setValue('Please include the leak tester.');
      await click(/Send request/);
      http.expectOne({ method: 'POST', url: '/api/loans' }).flush(
        {
          error: {
            code: 'unit_unavailable',
            message:
              'Not booked: Dralvik U6 slim ureteroscope MSU-0001 is not available for these dates.',
            details: {
              conflicts: [
                {
                  unitId: 5,
                  reasonCode: 'booked',
                  reason: 'Booked by another hospital',
                  earliestUseFrom: earliest,
                },
              ],
              alternatives: [
                alternative(5, { unitId: 6, serialNumber: 'MSU-0002' }),
                {
                  ...alternative(5, {
                    unitId: 31,
                    serialNumber: 'MVT-0002',
                    modelId: towerModel.id,
                  }),
                  relation: 'compatible_model',
                },
              ],
            },
          },
        },
        { status: 409, statusText: 'Conflict' },
      );
      await settle();
      // The page looks again, and now the server's answer shows on the unit too.
      await answerChecks([
        { ...scope, feasible: false, reasonCode: 'booked', reason: 'Booked by another hospital' },
        tower,
      ]);
    }

    it('names the unit, offers its earliest dates and stand-ins, and keeps the form', async () => {
      await refused();
      expect(await selectedStep()).toBe('Review and send');
      const panel = harness.routeNativeElement!.querySelector('.conflicts') as HTMLElement;
      expect(panel.getAttribute('role')).toBe('alert');
      expect(panel.textContent).toContain('Not sent: some units are no longer free');
      expect(panel.textContent).toContain(
        'Dralvik U6 slim ureteroscope MSU-0001 — Booked by another hospital',
      );
      // Same length of window (3 days) from the earliest first case day.
      expect(panel.textContent).toContain(
        `Move all units to ${formatWindow(earliest, future(62))}`,
      );
      expect(panel.textContent).toContain('MSU-0002');
      // A unit of another model is not a substitute, even if the server lists it.
      expect(panel.textContent).not.toContain('MVT-0002');
      const note = await loader.getHarness(MatInputHarness.with({ selector: 'textarea' }));
      expect(await note.getValue()).toBe('Please include the leak tester.');
      const send = await loader.getHarness(MatButtonHarness.with({ text: /Send request/ }));
      expect(await send.isDisabled()).toBe(true);
    });

    it('swaps in a stand-in and lets the request go again', async () => {
      await refused();
      await click(/Swap in/);
      expect(
        TestBed.inject(LoanDraft)
          .units()
          .map((u) => u.unitId),
      ).toEqual([6, 30]);
      expect(harness.routeNativeElement!.querySelector('.conflicts')).toBeNull();
      await answerChecks([spareScope, tower]);
      const send = await loader.getHarness(MatButtonHarness.with({ text: /Send request/ }));
      expect(await send.isDisabled()).toBe(false);
      await send.click();
      const post = http.expectOne({ method: 'POST', url: '/api/loans' });
      expect(post.request.body.unitIds).toEqual([6, 30]);
      expect(post.request.body.note).toBe('Please include the leak tester.');
      post.flush(
        { loan: loan({ id: 78, reference: 'EV-2027-000078', state: 'requested' }) },
        { status: 201, statusText: 'Created' },
      );
      await settle();
    });

    it('moves the case days to the unit’s earliest window', async () => {
      await refused();
      await click(/Move all units to/);
      const range = await loader.getHarness(MatDateRangeInputHarness);
      expect(await (await range.getStartInput()).getValue()).toBe(typed(earliest));
      expect(await (await range.getEndInput()).getValue()).toBe(typed(future(62)));
      const checks = await answerChecks([
        { ...scope, milestones: milestonesFor(earliest, future(62)) },
        { ...tower, milestones: milestonesFor(earliest, future(62)) },
      ]);
      expect(checks[0]!.request.params.get('useFrom')).toBe(earliest);
    });
  });

  it('shows the server’s field messages on the first step (422)', async () => {
    await open();
    await goToReview();
    await click(/Send request/);
    http.expectOne({ method: 'POST', url: '/api/loans' }).flush(
      {
        error: {
          code: 'invalid_window',
          message: 'The first case day is in the past.',
          details: {
            fieldErrors: { useFrom: ['The first case day is in the past.'] },
            formErrors: [],
          },
        },
      },
      { status: 422, statusText: 'Unprocessable Entity' },
    );
    await settle();
    expect(await selectedStep()).toBe('Campus and case days');
    expect(
      harness.routeNativeElement!.querySelector('.date-error .message')?.textContent?.trim(),
    ).toBe('The first case day is in the past.');
  });

  it('points to Find equipment when no units are chosen', async () => {
    TestBed.inject(LoanDraft).clear();
    await harness.navigateByUrl('/loans/new');
    loader = TestbedHarnessEnvironment.loader(harness.fixture);
    http.expectOne('/api/sites').flush({ items: sites });
    await settle();
    await click(/Next: units/);
    expect(text()).toContain('No units in this request yet');
    const next = await loader.getHarness(MatButtonHarness.with({ text: /Next: review/ }));
    expect(await next.isDisabled()).toBe(true);
  });
});
