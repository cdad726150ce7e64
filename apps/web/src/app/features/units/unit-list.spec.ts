import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatSortHarness } from '@angular/material/sort/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
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
    fixture = TestBed.createComponent(UnitList);
    loader = TestbedHarnessEnvironment.loader(fixture);
    root = TestbedHarnessEnvironment.documentRootLoader(fixture);
    await fixture.whenStable();
    http.expectOne(`/api/units?lenderId=${lenderId}`).flush({ items: units });
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
        const unit = units.find((u) => u.id === unitId)!;
        // Each unit is asked from today in its own depot's calendar.
        expect(request.request.params.get('from')).toBe(todayIn(unit.homeDepotTimeZone));
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

  it('filters by text, model, depot and status, and sorts by next hold', async () => {
    await open('fleet_manager');
    await answerHoldLookups();
    const table = await loader.getHarness(MatTableHarness);

    const search = await loader.getHarness(MatInputHarness.with({ selector: '[type="search"]' }));
    await search.setValue('A5 robotic');
    expect((await cells()).map((r) => r['serial'])).toEqual([expect.stringContaining('MA-0001')]);
    await search.setValue('');

    const select = (label: string) =>
      loader
        .getHarness(MatFormFieldHarness.with({ floatingLabelText: label }))
        .then((f) => f.getControl(MatSelectHarness));
    await (await select('Model'))!.clickOptions({ text: 'Dralvik U8 ureteroscope' });
    expect(await table.getRows()).toHaveLength(3);
    await (await select('Base depot'))!.clickOptions({ text: 'Dralvik Central Depot' });
    expect((await cells()).map((r) => r['serial'])).toEqual([expect.stringContaining('MV-0002')]);
    await (await select('Status'))!.clickOptions({ text: 'Retired' });
    expect(await table.getRows()).toHaveLength(0);
    expect(fixture.nativeElement.querySelector('.no-rows').textContent).toContain(
      'No unit matches these filters.',
    );
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Clear filters' }))).click();
    expect(await table.getRows()).toHaveLength(4);

    const sort = await loader.getHarness(MatSortHarness);
    const [nextHeader] = await sort.getSortHeaders({ label: 'Next hold' });
    await nextHeader!.click();
    expect((await cells())[0]!['serial']).toContain('MV-0001');
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
    request.flush(
      {
        unit: fleetUnit({
          id: 7010,
          modelId: 43,
          modelName: 'Dralvik L3 laser',
          category: 'laser',
          serialNumber: 'ML-0007',
          udiDi: '09521234543213',
          homeDepotId: 502,
          homeDepotName: 'Dralvik Central Depot',
          homeDepotTimeZone: 'Europe/Berlin',
        }),
      },
      { status: 201, statusText: 'Created' },
    );
    await settle();
    http.expectOne((r) => r.url === '/api/units/7010/holds').flush({ items: [] });
    await settle();
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
