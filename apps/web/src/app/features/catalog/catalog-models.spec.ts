import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpRequest, provideHttpClient, withInterceptors } from '@angular/common/http';
import {
  HttpTestingController,
  TestRequest,
  provideHttpClientTesting,
} from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { Router, provideRouter } from '@angular/router';
import type { Model } from '@evalon/contracts';
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
    await settle();
    const first = http.expectOne(isList);
    expect(first.request.params.toString()).toBe(
      `page=0&size=10&sort=name,asc&lenderId=${lenderId}`,
    );
    // The server sorts; by name by default.
    answer(
      first,
      [...fleetModels].sort((a, b) => a.name.localeCompare(b.name)),
    );
    await settle();
  });

  afterEach(() => http.verify());

  /** Whether a request asks for a page of models. */
  const isList = (r: HttpRequest<unknown>) => r.method === 'GET' && r.url === '/api/models';

  /** Lets answers and timers land (a pending list request keeps the app from being stable). */
  async function settle(): Promise<void> {
    await new Promise((resolve) => setTimeout(resolve));
    fixture.detectChanges();
    await new Promise((resolve) => setTimeout(resolve));
  }

  /** Answers a list request with `models` as the page, counting their units as the server does. */
  function answer(request: TestRequest, models: Model[]): void {
    request.flush({
      items: models,
      total: models.length,
      page: 0,
      size: 10,
      unitTotal: models.reduce((sum, m) => sum + m.unitCount, 0),
    });
  }

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
      '3 models · 6 units in service',
    );
  });

  it('asks the server for search words, a category and another order, keeping them in the URL', async () => {
    const search = await loader.getHarness(MatInputHarness.with({ selector: '[type="search"]' }));
    await search.setValue('laser');
    await new Promise((resolve) => setTimeout(resolve, 350)); // the search waits for a pause
    const byWords = http.expectOne(isList);
    expect(byWords.request.params.get('q')).toBe('laser');
    answer(
      byWords,
      fleetModels.filter((m) => m.name.includes('laser')),
    );
    await settle();
    expect((await rows()).map((r) => r['name'])).toEqual([
      expect.stringContaining('Dralvik L3 laser'),
    ]);

    await (await loader.getHarness(MatSelectHarness)).open();
    // Through the DOM: a harness click would wait for the request it sends.
    [...document.querySelectorAll<HTMLElement>('mat-option')]
      .find((o) => o.textContent?.includes('Flexible endoscope'))!
      .click();
    await settle();
    const byCategory = http.expectOne(isList);
    expect(byCategory.request.params.get('category')).toBe('flexible_endoscope');
    expect(byCategory.request.params.get('q')).toBe('laser');
    answer(byCategory, []);
    await settle();
    expect(fixture.nativeElement.querySelector('[ev-list-no-rows]').textContent).toContain(
      'No model matches these filters.',
    );
    expect(TestBed.inject(Router).url).toBe('/?q=laser&category=flexible_endoscope');

    (fixture.nativeElement.querySelector('th.mat-column-listValue') as HTMLElement).click();
    await settle();
    const sorted = http.expectOne(isList);
    expect(sorted.request.params.get('sort')).toBe('listValue,asc');
    answer(sorted, []);
    await settle();
    expect(TestBed.inject(Router).url).toBe(
      '/?q=laser&category=flexible_endoscope&sort=listValue,asc',
    );
  });
});
