import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpRequest, provideHttpClient, withInterceptors } from '@angular/common/http';
import {
  HttpTestingController,
  TestRequest,
  provideHttpClientTesting,
} from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { Router, provideRouter } from '@angular/router';
import type { Role, Unit } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { todayIn } from '../../shared/iso-date';
import { membership, person } from '../../testing/people';
import {
  fleetDepots,
  fleetHold,
  fleetModels,
  fleetUnit,
  lenderId,
} from '../catalog/fleet-fixtures';
import { UnitList } from './unit-list';

const units: Unit[] = [
  fleetUnit(),
  fleetUnit({
    id: 7002,
    serialNumber: 'MV-0002',
    homeDepotId: 502,
    homeDepotName: 'Dralvik Central Depot',
    homeDepotTimeZone: 'Europe/Berlin',
    status: 'maintenance',
  }),
  fleetUnit({
    id: 7003,
    modelId: 42,
    modelName: 'Dralvik A5 robotic platform',
    category: 'robotic_platform',
    serialNumber: 'MA-0001',
    udiDi: null,
    status: 'active',
  }),
  fleetUnit({ id: 7004, serialNumber: 'MV-0003', status: 'retired' }),
];

describe('UnitList', () => {
  let fixture: ComponentFixture<UnitList>;
  let loader: HarnessLoader;
  let root: HarnessLoader;
  let http: HttpTestingController;

  /**
   * Lets answers and timers land and the view update. Not `whenStable()`: a list request on its
   * way keeps the app unstable until the test answers it.
   */
  async function settle(): Promise<void> {
    await new Promise((resolve) => setTimeout(resolve));
    fixture.detectChanges();
    await new Promise((resolve) => setTimeout(resolve));
  }

  /** Whether a request asks for a page of units. */
  const isList = (r: HttpRequest<unknown>) => r.method === 'GET' && r.url === '/api/units';

  /** Answers a list request with `page` as the rows (the server filtered and sorted them). */
  function answer(request: TestRequest, page: Unit[]): void {
    const statusCounts = (['active', 'maintenance', 'retired'] as const)
      .map((status) => ({ status, count: page.filter((u) => u.status === status).length }))
      .filter((c) => c.count > 0);
    request.flush({ items: page, total: page.length, page: 0, size: 10, statusCounts });
  }

  /** Picks an option of the select labelled `label`, through the DOM (a harness click would
   * wait for the request the choice sends). */
  async function choose(label: string, option: string): Promise<void> {
    const field = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
    await ((await field.getControl(MatSelectHarness)) as MatSelectHarness).open();
    [...document.querySelectorAll<HTMLElement>('mat-option')]
      .find((o) => o.textContent?.trim() === option)!
      .click();
    await settle();
  }

  /** The units in serial-number order, as the server answers by default. */
  const bySerial = [...units].sort((a, b) => a.serialNumber.localeCompare(b.serialNumber));

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
    await TestBed.inject(Router).navigateByUrl('/');
    fixture = TestBed.createComponent(UnitList);
    loader = TestbedHarnessEnvironment.loader(fixture);
    root = TestbedHarnessEnvironment.documentRootLoader(fixture);
    await settle();
    const list = http.expectOne(isList);
    expect(list.request.params.toString()).toBe(
      `page=0&size=10&sort=serial,asc&lenderId=${lenderId}`,
    );
    answer(list, bySerial);
    http.expectOne(`/api/models?lenderId=${lenderId}`).flush({ items: fleetModels });
    http.expectOne(`/api/lenders/${lenderId}/depots`).flush({ items: fleetDepots });
    await settle();
  }

  /** Answers every unit's "next hold" lookup: a loan for MV-0001, nothing for the others. */
  async function answerHoldLookups(): Promise<void> {
    // The lookups run four at a time, so answer until none is left.
    for (let round = 0; round < 3; round++) {
      for (const request of http.match((r) => /\/api\/units\/\d+\/holds$/.test(r.url))) {
        const unitId = Number(/units\/(\d+)\//.exec(request.request.url)![1]);
        const unit = units.find((u) => u.id === unitId);
        // Each unit is asked from today in its own depot's calendar.
        if (unit) {
          expect(request.request.params.get('from')).toBe(todayIn(unit.homeDepotTimeZone));
        }
        request.flush({
          items: unitId === 7001 ? [fleetHold({ start: '2099-03-01', end: '2099-03-12' })] : [],
        });
      }
      await settle();
    }
  }

  afterEach(() => http.verify());

  const cells = async () => {
    const table = await loader.getHarness(MatTableHarness);
    return Promise.all((await table.getRows()).map((row) => row.getCellTextByColumnName()));
  };

  it('lists serial, model, base depot, status and next hold, sorted by serial', async () => {
    await open('fleet_manager');
    await answerHoldLookups();
    const rows = await cells();
    expect(rows.map((r) => r['serial'])).toEqual([
      expect.stringContaining('MA-0001'),
      expect.stringContaining('MV-0001'),
      expect.stringContaining('MV-0002'),
      expect.stringContaining('MV-0003'),
    ]);
    expect(rows[0]!['serial']).toContain('No UDI-DI recorded');
    expect(rows[1]!['serial']).toContain('UDI-DI 02000000000008');
    expect(rows[1]!['model']).toContain('Dralvik U8 ureteroscope');
    expect(rows[2]!['depot']).toBe('Dralvik Central Depot');
    expect(rows.map((r) => r['status'])).toEqual([
      expect.stringContaining('Available'),
      expect.stringContaining('Available'),
      expect.stringContaining('In maintenance'),
      expect.stringContaining('Retired'),
    ]);
    expect(rows[1]!['next']).toContain('Mar 1 – Mar 12, 2099');
    expect(rows[1]!['next']).toContain('Loan EV-2027-000101 · Velmora Health');
    expect(rows[0]!['next']).toContain('Nothing booked');
    expect(fixture.nativeElement.querySelector('.summary').textContent).toContain(
      '4 units · 2 available · 1 in maintenance · 1 retired',
    );
  });

  it('asks the server for search words, model, depot, status and order, keeping them in the URL', async () => {
    await open('fleet_manager');
    await answerHoldLookups();

    const search = await loader.getHarness(MatInputHarness.with({ selector: '[type="search"]' }));
    await search.setValue('A5 robotic');
    await new Promise((resolve) => setTimeout(resolve, 350)); // the search waits for a pause
    const byWords = http.expectOne(isList);
    expect(byWords.request.params.get('q')).toBe('A5 robotic');
    answer(byWords, [units[2]!]);
    await answerHoldLookups();
    expect((await cells()).map((r) => r['serial'])).toEqual([expect.stringContaining('MA-0001')]);

    await choose('Model', 'Dralvik U8 ureteroscope');
    const byModel = http.expectOne(isList);
    expect(byModel.request.params.get('modelId')).toBe('41');
    answer(byModel, []);
    await choose('Base depot', 'Dralvik Central Depot');
    answer(
      http.expectOne((r) => isList(r) && r.params.get('depotId') === '502'),
      [],
    );
    await choose('Status', 'Retired');
    const byStatus = http.expectOne(isList);
    expect(byStatus.request.params.get('status')).toBe('retired');
    expect(TestBed.inject(Router).url).toBe(
      '/?q=A5%20robotic&modelId=41&depotId=502&status=retired',
    );
    answer(byStatus, []);
    await settle();
    expect(fixture.nativeElement.querySelector('[ev-list-no-rows]').textContent).toContain(
      'No unit matches these filters.',
    );

    const clear = [...fixture.nativeElement.querySelectorAll('button')].find((b: HTMLElement) =>
      b.textContent?.includes('Clear filters'),
    ) as HTMLElement;
    clear.click();
    await settle();
    const cleared = http.expectOne(isList);
    expect(cleared.request.params.toString()).toBe(
      `page=0&size=10&sort=serial,asc&lenderId=${lenderId}`,
    );
    answer(cleared, bySerial);
    await answerHoldLookups();
    expect(await (await loader.getHarness(MatTableHarness)).getRows()).toHaveLength(4);

    (fixture.nativeElement.querySelector('th.mat-column-next') as HTMLElement).click();
    await settle();
    const byNext = http.expectOne(isList);
    expect(byNext.request.params.get('sort')).toBe('next,asc');
    answer(byNext, bySerial);
    await answerHoldLookups();
  });

  it('lets fleet managers add a unit through the dialog', async () => {
    await open('fleet_manager');
    await answerHoldLookups();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add a unit/ }))).click();
    const dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Add a unit');
    const control = (label: string) =>
      dialog
        .getHarness(MatFormFieldHarness.with({ floatingLabelText: label }))
        .then((f) => f.getControl());
    await ((await control('Model')) as MatSelectHarness).clickOptions({
      text: 'Dralvik L3 laser',
    });
    await ((await control('Serial number')) as MatInputHarness).setValue('ML-0007');
    const udi = (await control('UDI device identifier (GTIN)')) as MatInputHarness;
    // 09521234543213 is a valid GTIN-14 (derived from GS1 General Specifications §7.9.1).
    await udi.setValue('09521234543214');
    await udi.blur();
    expect(
      await (
        await dialog.getHarness(
          MatFormFieldHarness.with({ floatingLabelText: 'UDI device identifier (GTIN)' }),
        )
      ).getTextErrors(),
    ).toEqual([
      'The last digit is not the GS1 check digit (it should be 3). Check for a typing error.',
    ]);
    await udi.setValue('09521234543213');
    await ((await control('Base depot')) as MatSelectHarness).clickOptions({
      text: 'Dralvik Central Depot',
    });
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Add unit' }))).click();

    const request = http.expectOne('/api/units');
    expect(request.request.body).toEqual({
      modelId: 43,
      serialNumber: 'ML-0007',
      udiDi: '09521234543213',
      homeDepotId: 502,
      status: 'active',
    });
    const saved = fleetUnit({
      id: 7010,
      modelId: 43,
      modelName: 'Dralvik L3 laser',
      category: 'laser',
      serialNumber: 'ML-0007',
      udiDi: '09521234543213',
      homeDepotId: 502,
      homeDepotName: 'Dralvik Central Depot',
      homeDepotTimeZone: 'Europe/Berlin',
    });
    request.flush({ unit: saved }, { status: 201, statusText: 'Created' });
    await settle();
    // The list is read again, with the new unit in it.
    answer(http.expectOne(isList), [...bySerial, saved]);
    await answerHoldLookups();
    expect((await cells()).map((r) => r['serial'])).toEqual(
      expect.arrayContaining([expect.stringContaining('ML-0007')]),
    );
  });

  it('shows the fleet read-only to coordinators', async () => {
    await open('coordinator');
    await answerHoldLookups();
    expect(
      await loader.getAllHarnesses(MatButtonHarness.with({ text: /Add a unit/ })),
    ).toHaveLength(0);
    expect(
      await loader.getAllHarnesses(
        MatButtonHarness.with({ selector: '[aria-label^="Change unit"]' }),
      ),
    ).toHaveLength(0);
    expect(
      await loader.getAllHarnesses(
        MatButtonHarness.with({ selector: '[aria-label^="Calendar of unit"]' }),
      ),
    ).toHaveLength(4);
  });
});
