import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { ActivatedRoute, convertToParamMap, provideRouter } from '@angular/router';
import type { VisitDetail } from '@evalon/contracts';
import { SessionStore } from '../../core/session-store';
import { addDays, todayIn } from '../../shared/iso-date';
import { membership, person } from '../../testing/people';
import { VisitPage } from './visit-page';

const proctorId = 101;

/** An accepted visit at a Boston campus whose first day is `from`. */
function acceptedVisit(from: string): VisitDetail {
  return {
    id: 1,
    reference: 'PV-2027-000001',
    kind: 'proctoring',
    state: 'accepted',
    hospitalId: 7,
    hospitalName: 'Velmora Health',
    siteId: 4,
    siteName: 'North Campus',
    siteTimeZone: 'America/New_York',
    jurisdiction: 'US-MA',
    modelId: 5,
    modelName: 'Model R2',
    loanId: null,
    from,
    to: addDays(from, 1),
    cases: 3,
    language: null,
    note: null,
    proctorId,
    proctorName: 'Dr Example',
    busyFrom: from,
    busyTo: addDays(from, 1),
    travelDays: 0,
    feeEstimate: { amount: 500_000, currency: 'USD' },
    currentOffer: null,
    createdAt: '2026-11-01T12:00:00Z',
    offers: [],
    events: [],
    caseRecords: [],
    signOffs: [],
    signOffThreshold: 3,
    trainees: [{ userId: 55, name: 'Robin Trainee' }],
  };
}

async function open(visit: VisitDetail) {
  TestBed.configureTestingModule({
    providers: [
      provideHttpClient(),
      provideHttpClientTesting(),
      provideRouter([]),
      { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      {
        provide: ActivatedRoute,
        useValue: { snapshot: { paramMap: convertToParamMap({ id: '1' }) } },
      },
    ],
  });
  TestBed.inject(SessionStore).setUser(
    person([membership('zelvara', 'proctor')], { id: proctorId }),
  );
  const fixture = TestBed.createComponent(VisitPage);
  const http = TestBed.inject(HttpTestingController);
  http.expectOne('/api/visits/1').flush({ visit });
  await fixture.whenStable();
  /** Lets a dialog's close reach its subscriber. */
  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  };
  return {
    settle,
    fixture,
    http,
    loader: TestbedHarnessEnvironment.loader(fixture),
    root: TestbedHarnessEnvironment.documentRootLoader(fixture),
  };
}

describe('VisitPage: the visit’s proctor', () => {
  it('withdraws before the first day only after a reason of 10+ characters and a confirmation', async () => {
    const from = addDays(todayIn('America/New_York'), 20);
    const { fixture, http, loader, root, settle } = await open(acceptedVisit(from));
    const withdraw = await loader.getHarness(
      MatButtonHarness.with({ text: /Withdraw from visit/ }),
    );
    const reason = await loader.getHarness(MatInputHarness.with({ ancestor: '.withdraw' }));
    await reason.setValue('Too busy');
    await withdraw.click();
    // Eight characters: nothing is sent, no confirmation is asked.
    http.expectNone('/api/visits/1/withdraw');
    expect(await root.getAllHarnesses(MatDialogHarness)).toHaveLength(0);
    expect(fixture.nativeElement.textContent).toContain('at least 10 characters');

    await reason.setValue('A family emergency keeps me at home.');
    await withdraw.click();
    const dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Withdraw from visit PV-2027-000001?');
    // "Keep the visit" sends nothing.
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Keep the visit' }))).click();
    await settle();
    http.expectNone('/api/visits/1/withdraw');

    await withdraw.click();
    const again = await root.getHarness(MatDialogHarness);
    await (await again.getHarness(MatButtonHarness.with({ text: 'Withdraw' }))).click();
    await settle();
    const req = http.expectOne('/api/visits/1/withdraw');
    expect(req.request.method).toBe('POST');
    expect(req.request.body).toEqual({ reason: 'A family emergency keeps me at home.' });
    req.flush({ visit: { ...acceptedVisit(from), state: 'offered', proctorId: null } });
    await fixture.whenStable();
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Withdraw/ }))).toHaveLength(
      0,
    );
    http.verify();
  });

  it('before the first day shows when cases open instead of the case form', async () => {
    const from = addDays(todayIn('America/New_York'), 3);
    const { fixture } = await open(acceptedVisit(from));
    const text = fixture.nativeElement.textContent as string;
    expect(text).toContain(`Cases can be recorded from ${from}`);
    expect(fixture.nativeElement.querySelector('form.case-form')).toBeNull();
  });

  it('on the first day offers the case form and no withdrawal', async () => {
    const { fixture, loader } = await open(acceptedVisit(todayIn('America/New_York')));
    expect(fixture.nativeElement.querySelector('form.case-form')).not.toBeNull();
    expect(
      await loader.getAllHarnesses(MatButtonHarness.with({ text: /Withdraw from visit/ })),
    ).toHaveLength(0);
  });
});
