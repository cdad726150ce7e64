import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { provideRouter } from '@angular/router';
import type { Role } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { membership, person } from '../../testing/people';
import { fleetHold, fleetUnit } from '../catalog/fleet-fixtures';
import { UnitDetail } from './unit-detail';

/** Holds far ahead, so they count as "coming" whatever day the test runs. */
const loanHold = fleetHold({ start: '2099-03-01', end: '2099-03-12' });
const maintenance = fleetHold({
  id: 8002,
  kind: 'maintenance',
  start: '2099-03-20',
  end: '2099-03-22',
  loanId: null,
  loanReference: null,
  hospitalName: null,
  reason: 'Annual service',
  label: 'Maintenance',
});

describe('UnitDetail', () => {
  let fixture: ComponentFixture<UnitDetail>;
  let loader: HarnessLoader;
  let root: HarnessLoader;
  let http: HttpTestingController;

  async function settle(): Promise<void> {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  }

  async function open(role: Role): Promise<void> {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(person([membership('dralvik', role)]));
    fixture = TestBed.createComponent(UnitDetail);
    fixture.componentRef.setInput('unitId', '7001');
    loader = TestbedHarnessEnvironment.loader(fixture);
    root = TestbedHarnessEnvironment.documentRootLoader(fixture);
    await fixture.whenStable();
    http.expectOne('/api/units/7001').flush({ unit: fleetUnit() });
    http.expectOne('/api/units/7001/holds').flush({ items: [maintenance, loanHold] });
    await settle();
  }

  afterEach(() => http.verify());

  /** Each listed hold as "when | what". */
  const holdTexts = () =>
    Array.from(fixture.nativeElement.querySelectorAll('.holds li') as NodeListOf<HTMLElement>).map(
      (li) =>
        [li.querySelector('.hold-when')!, li.querySelector('.hold-text > .detail')!]
          .map((el) => el.textContent!.replace(/\s+/g, ' ').trim())
          .join(' | '),
    );

  it('lists coming holds in order and opens the calendar on the next one', async () => {
    await open('fleet_manager');
    expect(holdTexts()).toEqual([
      'Mar 1 – Mar 12, 2099 · 12 days | Loan EV-2027-000101 · Velmora Health',
      'Mar 20 – Mar 22, 2099 · 3 days | Maintenance: Annual service',
    ]);
    expect(fixture.nativeElement.querySelector('ev-hold-calendar').textContent).toContain(
      'March 2099',
    );
  });

  it('removes a maintenance block only after confirmation', async () => {
    await open('fleet_manager');
    // Loan holds go with their loan: only the maintenance block has a remove button.
    const removes = await loader.getAllHarnesses(
      MatButtonHarness.with({ selector: '[aria-label^="Remove maintenance block"]' }),
    );
    expect(removes).toHaveLength(1);
    await removes[0]!.click();
    const dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Remove this maintenance block?');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Remove block' }))).click();
    const request = http.expectOne('/api/units/7001/holds/8002');
    expect(request.request.method).toBe('DELETE');
    request.flush(null, { status: 204, statusText: 'No Content' });
    await settle();
    expect(holdTexts()).toEqual([expect.stringContaining('Loan EV-2027-000101')]);
  });

  it('shows coordinators the unit without changes or maintenance buttons', async () => {
    await open('coordinator');
    expect(holdTexts()).toHaveLength(2);
    for (const text of [/Change unit/, /Block for maintenance/]) {
      expect(await loader.getAllHarnesses(MatButtonHarness.with({ text }))).toHaveLength(0);
    }
    expect(
      await loader.getAllHarnesses(
        MatButtonHarness.with({ selector: '[aria-label^="Remove maintenance block"]' }),
      ),
    ).toHaveLength(0);
  });
});
