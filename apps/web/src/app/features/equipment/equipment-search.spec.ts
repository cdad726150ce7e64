import { ChangeDetectionStrategy, Component } from '@angular/core';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatDateRangeInputHarness } from '@angular/material/datepicker/testing';
import { MatProgressBarHarness } from '@angular/material/progress-bar/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { Router, provideRouter, withComponentInputBinding } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { formatDay, formatWindow } from '../../shared/iso-date';
import { LOAN_DRAFT_KEY, LoanDraft } from '../../shared/loan-draft';
import {
  alternative,
  availabilityItem,
  availabilityResponse,
  future,
  milestonesFor,
  models,
  sites,
  towerModel,
  typed,
} from '../../testing/marketplace';
import { membership, person } from '../../testing/people';
import { EquipmentSearch } from './equipment-search';

@Component({ template: '', changeDetection: ChangeDetectionStrategy.OnPush })
class Blank {}

describe('EquipmentSearch', () => {
  let harness: RouterTestingHarness;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve));
    await harness.fixture.whenStable();
  };
  const text = () => (harness.routeNativeElement as HTMLElement).textContent ?? '';
  const isAvailability = (r: { url: string }) => r.url === '/api/availability';

  beforeEach(async () => {
    sessionStorage.removeItem(LOAN_DRAFT_KEY);
    TestBed.configureTestingModule({
      providers: [
        provideRouter(
          [
            { path: 'equipment', component: EquipmentSearch },
            { path: 'equipment/units/:unitId', component: Blank },
            { path: 'loans/new', component: Blank },
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

  afterEach(() => http.verify());

  /** Opens `/equipment…` and answers the sites and models requests. */
  async function open(url = '/equipment'): Promise<void> {
    await harness.navigateByUrl(url);
    loader = TestbedHarnessEnvironment.loader(harness.fixture);
    http.expectOne('/api/sites').flush({ items: sites });
    http.expectOne((r) => r.url === '/api/models').flush({ items: models });
    await settle();
  }

  async function setDates(from: string, to: string): Promise<void> {
    const range = await loader.getHarness(MatDateRangeInputHarness);
    await (await range.getStartInput()).setValue(from);
    await (await range.getEndInput()).setValue(to);
    await (await range.getEndInput()).blur();
  }

  async function clickSearch(): Promise<void> {
    await (await loader.getHarness(MatButtonHarness.with({ text: /Search/ }))).click();
    await settle();
  }

  const dateAlert = () =>
    harness.routeNativeElement!.querySelector('.date-error .message')?.textContent?.trim() ?? '';

  describe('the search form', () => {
    it('starts with the first campus, an empty state and no search', async () => {
      await open();
      const campus = await loader.getHarness(
        MatSelectHarness.with({ selector: '[formControlName="siteId"]' }),
      );
      expect(await campus.getValueText()).toBe('Velmora East Campus');
      expect(text()).toContain('Choose your campus and case days');
      http.expectNone(isAvailability);
    });

    it('refuses to search without case days and says which day is missing', async () => {
      await open();
      await clickSearch();
      expect(dateAlert()).toBe('Choose the first case day.');
      http.expectNone(isAvailability);

      const range = await loader.getHarness(MatDateRangeInputHarness);
      await (await range.getStartInput()).setValue(typed(future(30)));
      await clickSearch();
      expect(dateAlert()).toBe('Choose the last case day.');
      http.expectNone(isAvailability);
    });

    it('refuses a first case day in the past, a reversed window and one longer than 90 days', async () => {
      await open();
      await setDates('1/6/2020', '1/8/2020');
      await clickSearch();
      expect(dateAlert()).toBe('The first case day can’t be in the past at this campus.');

      await setDates(typed(future(30)), typed(future(25)));
      await clickSearch();
      expect(dateAlert()).toBe('The last case day is before the first.');

      // Day 30 to day 120 counted inclusively is 91 days: one more than the contract allows.
      await setDates(typed(future(30)), typed(future(120)));
      await clickSearch();
      expect(dateAlert()).toBe('A loan covers at most 90 days of cases.');
      http.expectNone(isAvailability);

      // Exactly 90 days is fine.
      await setDates(typed(future(30)), typed(future(119)));
      await clickSearch();
      expect(dateAlert()).toBe('');
      const request = http.expectOne(isAvailability);
      expect(request.request.params.get('useFrom')).toBe(future(30));
      expect(request.request.params.get('useTo')).toBe(future(119));
      request.flush(availabilityResponse([]));
    });
  });

  describe('results', () => {
    const from = future(40);
    const to = future(42);
    const feasible = availabilityItem({
      unitId: 5,
      serialNumber: 'MSU-0001',
      milestones: milestonesFor('2027-03-01', '2027-03-03'),
      firstLoanOfModel: true,
      leadDays: 3,
    });
    const earliestFrom = future(50);
    const earliestTo = future(52);
    const blocked = availabilityItem({
      unitId: 9,
      serialNumber: 'MSU-0007',
      depotId: 22,
      depotName: 'Dralvik Europe Depot',
      feasible: false,
      distanceKm: 5896.9,
      transitDays: 7,
      reasonCode: 'too_soon',
      reason: 'Too soon: it could not arrive in time',
      earliestUseFrom: earliestFrom,
      earliestUseTo: earliestTo,
    });
    const tower = availabilityItem({
      unitId: 30,
      serialNumber: 'MVT-0001',
      modelId: towerModel.id,
      modelName: towerModel.name,
      category: towerModel.category,
      deposit: { amount: 950_000, currency: 'USD' },
    });

    async function searchWithResults(): Promise<void> {
      await open();
      const category = await loader.getHarness(
        MatSelectHarness.with({ selector: '[formControlName="category"]' }),
      );
      await category.open();
      await category.clickOptions({ text: 'Flexible endoscope' });
      await setDates(typed(from), typed(to));
      await clickSearch();
      expect(await loader.getAllHarnesses(MatProgressBarHarness)).toHaveLength(1);
      const request = http.expectOne(isAvailability);
      expect(request.request.params.get('siteId')).toBe('11');
      expect(request.request.params.get('category')).toBe('flexible_endoscope');
      request.flush(availabilityResponse([feasible, blocked, tower]));
      await settle();
    }

    const row = (unitId: number) =>
      harness.routeNativeElement!.querySelector(
        `ev-availability-row[data-unit-id="${unitId}"]`,
      ) as HTMLElement;

    it('puts the search in the address and groups units by model', async () => {
      await searchWithResults();
      const url = TestBed.inject(Router).url;
      expect(url).toContain(`siteId=11`);
      expect(url).toContain(`from=${from}`);
      expect(url).toContain(`to=${to}`);
      expect(await loader.getAllHarnesses(MatProgressBarHarness)).toHaveLength(0);
      const headings = Array.from(harness.routeNativeElement!.querySelectorAll('.model-name')).map(
        (h) => h.textContent!.trim(),
      );
      expect(headings).toEqual(['Dralvik U6 slim ureteroscope', 'Dralvik V2 imaging tower']);
      expect(text()).toContain('1 of 2 units fit your dates');
      expect(text()).toContain('2 can be there in time');
      // The first-loan lead time is said once, on the model.
      expect(text()).toContain('first loan of this model: it arrives 3');
    });

    it('shows a unit that fits with its arrival, ship-by day, travel and deposit', async () => {
      await searchWithResults();
      const fits = row(5).textContent!;
      expect(fits).toContain('Can be there for your dates');
      expect(fits).toContain('Arrives by');
      expect(fits).toContain('Wed, Feb 24, 2027'); // deliverBy = 2027-03-01 − 5 days
      expect(fits).toContain('Ship by');
      expect(fits).toContain('Mon, Feb 22, 2027');
      expect(fits).toContain('340 km · 2 business days in transit');
      // 560 000 minor units of USD (2 decimals, ISO 4217) is $5,600.00.
      expect(fits).toContain('$5,600.00');
      const add = await loader.getHarness(
        MatButtonHarness.with({
          ancestor: 'ev-availability-row[data-unit-id="5"]',
          text: /Add to request/,
        }),
      );
      expect(await add.isDisabled()).toBe(false);
    });

    it('shows a unit that does not fit with the reason and its earliest dates, and no add button', async () => {
      await searchWithResults();
      const blockedText = row(9).textContent!;
      expect(blockedText).toContain('Too soon: it could not arrive in time');
      expect(blockedText).toContain(`Earliest: ${formatDay(earliestFrom)}`);
      expect(blockedText).toContain('Would have to arrive by');
      expect(blockedText).toContain('5,897 km · 7 business days in transit');
      expect(blockedText).not.toContain('Can be there');
      const buttons = await loader.getAllHarnesses(
        MatButtonHarness.with({ ancestor: 'ev-availability-row[data-unit-id="9"]' }),
      );
      const labels = await Promise.all(buttons.map((b) => b.getText()));
      expect(labels).toEqual([
        `Use ${formatWindow(earliestFrom, earliestTo)}`,
        'swap_horiz Stand-ins',
      ]);
    });

    it('searches again with a unit’s earliest dates', async () => {
      await searchWithResults();
      const use = await loader.getHarness(MatButtonHarness.with({ text: /^Use / }));
      await use.click();
      await settle();
      const again = http.expectOne(isAvailability);
      expect(again.request.params.get('useFrom')).toBe(earliestFrom);
      expect(again.request.params.get('useTo')).toBe(earliestTo);
      again.flush(availabilityResponse([{ ...blocked, feasible: true, reason: null }]));
    });

    it('adds units to the request and shows the request tray', async () => {
      await searchWithResults();
      await (
        await loader.getHarness(
          MatButtonHarness.with({
            ancestor: 'ev-availability-row[data-unit-id="5"]',
            text: /Add to request/,
          }),
        )
      ).click();
      await (
        await loader.getHarness(
          MatButtonHarness.with({
            ancestor: 'ev-availability-row[data-unit-id="30"]',
            text: /Add to request/,
          }),
        )
      ).click();
      await settle();
      const draft = TestBed.inject(LoanDraft);
      expect(draft.units().map((u) => u.unitId)).toEqual([5, 30]);
      expect(draft.value()).toEqual(
        expect.objectContaining({ siteId: 11, useFrom: from, useTo: to }),
      );
      const tray = harness.routeNativeElement!.querySelector('.tray') as HTMLElement;
      // $5,600.00 + $9,500.00
      expect(tray.textContent).toContain('2 units in your request');
      expect(tray.textContent).toContain('$15,100.00');
      // Pressing again takes the unit out.
      await (
        await loader.getHarness(
          MatButtonHarness.with({
            ancestor: 'ev-availability-row[data-unit-id="5"]',
            text: /In your request/,
          }),
        )
      ).click();
      expect(draft.units().map((u) => u.unitId)).toEqual([30]);
    });

    it('lists stand-ins for a unit that does not fit', async () => {
      await searchWithResults();
      await (await loader.getHarness(MatButtonHarness.with({ text: /Stand-ins/ }))).click();
      const request = http.expectOne((r) => r.url === '/api/availability/alternatives');
      expect(request.request.params.get('unitId')).toBe('9');
      request.flush({ items: [alternative(9, { unitId: 6, serialNumber: 'MSU-0002' })] });
      await settle();
      expect(row(9).textContent).toContain('Dralvik U6 slim ureteroscope · MSU-0002');
      await (await loader.getHarness(MatButtonHarness.with({ text: /^add Add$/ }))).click();
      expect(TestBed.inject(LoanDraft).has(6)).toBe(true);
    });

    it('says when nothing matches, and offers to clear the filters', async () => {
      await open(`/equipment?siteId=11&from=${from}&to=${to}&q=laser`);
      http.expectOne(isAvailability).flush(availabilityResponse([]));
      await settle();
      expect(text()).toContain('No equipment matches these filters');
      await (await loader.getHarness(MatButtonHarness.with({ text: /Clear filters/ }))).click();
      await settle();
      const again = http.expectOne(isAvailability);
      expect(again.request.params.has('q')).toBe(false);
      again.flush(availabilityResponse([feasible]));
    });

    it('explains a failed search and tries again', async () => {
      await open(`/equipment?siteId=11&from=${from}&to=${to}`);
      http
        .expectOne(isAvailability)
        .flush(
          { error: { code: 'internal', message: 'The search is unavailable.' } },
          { status: 503, statusText: 'Unavailable' },
        );
      await settle();
      expect(text()).toContain('The search didn’t work');
      expect(text()).toContain('The search is unavailable.');
      await (await loader.getHarness(MatButtonHarness.with({ text: /Try again/ }))).click();
      await settle();
      http.expectOne(isAvailability).flush(availabilityResponse([feasible]));
      await settle();
      expect(text()).toContain('Can be there for your dates');
    });
  });
});
