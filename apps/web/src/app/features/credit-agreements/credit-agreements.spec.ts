import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatSlideToggleHarness } from '@angular/material/slide-toggle/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { loan } from '../../testing/marketplace';
import { creditAgreement } from '../../testing/payments';
import { membership, organisations, person } from '../../testing/people';
import { CreditAgreements, agreementRows } from './credit-agreements';

const zelvara = creditAgreement({
  hospitalId: organisations.zelvara.id,
  hospitalName: organisations.zelvara.name,
});

describe('CreditAgreements', () => {
  let fixture: ComponentFixture<CreditAgreements>;
  let loader: HarnessLoader;
  let root: HarnessLoader;
  let http: HttpTestingController;

  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  };

  async function open(): Promise<void> {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(
      person([membership('dralvik', 'fleet_manager')], { timeZone: 'America/New_York' }),
    );
    fixture = TestBed.createComponent(CreditAgreements);
    loader = TestbedHarnessEnvironment.loader(fixture);
    root = TestbedHarnessEnvironment.documentRootLoader(fixture);
    await fixture.whenStable();
    http
      .expectOne(`/api/lenders/${organisations.dralvik.id}/credit-agreements`)
      .flush({ items: [zelvara] });
    // Velmora is known from its two loans; Zelvara from its agreement only.
    http.expectOne('/api/loans?limit=500').flush({
      items: [
        loan({ id: 1, reference: 'EV-2026-000001', state: 'approved' }),
        loan({ id: 2, reference: 'EV-2026-000002', state: 'requested' }),
      ],
    });
    await settle();
  }

  afterEach(() => http.verify());

  it('lists every hospital with its agreement, by name', async () => {
    await open();
    const rows = await (await loader.getHarness(MatTableHarness)).getCellTextByColumnName();
    expect(rows['hospital']!.text).toEqual([
      'Velmora Health2 loans with you',
      'Zelvara HospitalsNo loans with you yet',
    ]);
    expect(rows['status']!.text).toEqual(['Off', 'Active']);
    expect(rows['record']!.text).toEqual([
      'Never set up',
      'On since Oct 1, 2026, 9:00 AM EDT · Priya Lennox',
    ]);
    expect(fixture.nativeElement.textContent).toContain(
      '1 of 2 hospitals have an active agreement.',
    );
  });

  it('turns an agreement on only after confirmation', async () => {
    await open();
    const toggle = (await loader.getAllHarnesses(MatSlideToggleHarness))[0]!;
    expect(await toggle.getAriaLabel()).toBe('Credit agreement with Velmora Health');
    await toggle.toggle();
    const dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe(
      'Turn on the credit agreement with Velmora Health?',
    );
    // Until confirmed, the switch shows what the server holds.
    expect(await toggle.isChecked()).toBe(false);
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Turn on' }))).click();
    const put = http.expectOne(
      `/api/lenders/${organisations.dralvik.id}/credit-agreements/${organisations.velmora.id}`,
    );
    expect(put.request.method).toBe('PUT');
    expect(put.request.body).toEqual({ active: true });
    put.flush({
      creditAgreement: creditAgreement({
        hospitalId: organisations.velmora.id,
        hospitalName: organisations.velmora.name,
        approvedBy: 'Dana Whitlock',
        approvedAt: '2026-12-02T15:00:00.000Z',
      }),
    });
    await settle();
    expect(await toggle.isChecked()).toBe(true);
    const rows = await (await loader.getHarness(MatTableHarness)).getCellTextByColumnName();
    expect(rows['status']!.text).toEqual(['Active', 'Active']);
  });

  it('keeps an agreement on when the fleet manager cancels turning it off', async () => {
    await open();
    const toggle = (await loader.getAllHarnesses(MatSlideToggleHarness))[1]!;
    expect(await toggle.isChecked()).toBe(true);
    await toggle.toggle();
    const dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe(
      'Turn off the credit agreement with Zelvara Hospitals?',
    );
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Cancel' }))).click();
    await settle();
    http.expectNone(() => true);
    expect(await toggle.isChecked()).toBe(true);
  });
});

describe('agreementRows', () => {
  it('merges agreements and hospitals known from loans, once each, by name', () => {
    const rows = agreementRows(
      [zelvara],
      [
        { hospitalId: organisations.zelvara.id, hospitalName: 'Zelvara Hospitals', loanCount: 3 },
        {
          hospitalId: organisations.velmora.id,
          hospitalName: 'Velmora Health',
          loanCount: 1,
        },
      ],
    );
    expect(rows.map((r) => [r.hospitalName, r.agreement?.active ?? null, r.loanCount])).toEqual([
      ['Velmora Health', null, 1],
      ['Zelvara Hospitals', true, 3],
    ]);
  });
});
