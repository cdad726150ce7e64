import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatSortHarness } from '@angular/material/sort/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import { formatMoney } from '@evalon/deposits';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { membership, person } from '../../testing/people';
import { CatalogModels } from './catalog-models';
import { fleetModels, lenderId } from './fleet-fixtures';

describe('CatalogModels', () => {
  let fixture: ComponentFixture<CatalogModels>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(person([membership('dralvik', 'fleet_manager')]));
    fixture = TestBed.createComponent(CatalogModels);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    http.expectOne(`/api/models?lenderId=${lenderId}`).flush({ items: fleetModels });
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  const rows = async () => {
    const table = await loader.getHarness(MatTableHarness);
    return Promise.all((await table.getRows()).map((r) => r.getCellTextByColumnName()));
  };

  it('shows category, list value and deposit with the deposits package’s formatting', async () => {
    const [robot, laser, scope] = await rows();
    expect(robot!['name']).toContain('Dralvik A5 robotic platform');
    expect(robot!['category']).toBe('Robotic platform');
    expect(robot!['listValue']).toBe(formatMoney(185_000_000, 'USD'));
    expect(robot!['deposit']).toContain(`${formatMoney(3_700_000, 'USD')} estimate`);
    expect(robot!['deposit']).toContain('2% of list value, $25,000.00–$60,000.00');
    expect(laser!['name']).toContain('Dralvik L3 laser');
    expect(scope!['units']).toContain('3');
    expect(scope!['units']).toContain('2 available');
    expect(fixture.nativeElement.querySelector('.summary').textContent).toContain(
      '3 models · 6 units',
    );
  });

  it('filters by text and category and sorts by list value', async () => {
    await (
      await loader.getHarness(MatInputHarness.with({ selector: '[type="search"]' }))
    ).setValue('laser');
    expect((await rows()).map((r) => r['name'])).toEqual([
      expect.stringContaining('Dralvik L3 laser'),
    ]);
    await (
      await loader.getHarness(MatInputHarness.with({ selector: '[type="search"]' }))
    ).setValue('');
    await (await loader.getHarness(MatSelectHarness)).clickOptions({ text: 'Flexible endoscope' });
    expect((await rows()).map((r) => r['name'])).toEqual([
      expect.stringContaining('Dralvik U8 ureteroscope'),
    ]);
    await (await loader.getHarness(MatSelectHarness)).clickOptions({ text: 'All categories' });

    const [header] = await (
      await loader.getHarness(MatSortHarness)
    ).getSortHeaders({
      label: 'List value',
    });
    await header!.click();
    expect((await rows()).map((r) => r['listValue'])).toEqual(
      [2_800_000, 14_500_000, 185_000_000].map((v) => formatMoney(v, 'USD')),
    );
  });
});
