import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import type { Unit } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { LOAN_DRAFT_KEY, LoanDraft } from '../../shared/loan-draft';
import {
  availabilityItem,
  availabilityResponse,
  milestonesFor,
  scopeModel,
  sites,
} from '../../testing/marketplace';
import { membership, person } from '../../testing/people';
import { UnitPage } from './unit-page';

const unit: Unit = {
  id: 5,
  modelId: scopeModel.id,
  modelName: scopeModel.name,
  category: scopeModel.category,
  lenderId: 12,
  serialNumber: 'MSU-0001',
  udiDi: '02904711200019',
  homeDepotId: 21,
  homeDepotName: 'Dralvik East Depot',
  homeDepotTimeZone: 'America/New_York',
  status: 'active',
};

describe('UnitPage', () => {
  let fixture: ComponentFixture<UnitPage>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  };
  const text = () => (fixture.nativeElement as HTMLElement).textContent ?? '';

  beforeEach(async () => {
    sessionStorage.removeItem(LOAN_DRAFT_KEY);
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(person([membership('velmora', 'buyer')]));
    fixture = TestBed.createComponent(UnitPage);
    fixture.componentRef.setInput('unitId', '5');
    fixture.componentRef.setInput('siteId', '11');
    fixture.componentRef.setInput('from', '2027-03-01');
    fixture.componentRef.setInput('to', '2027-03-03');
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    // The map is not what this spec is about: let its script fail to load.
    http.expectOne('/api/config/maps').flush({}, { status: 503, statusText: 'Unavailable' });
    http.expectOne('/api/sites').flush({ items: sites });
    http.expectOne('/api/units/5').flush({ unit });
    await settle();
    http.expectOne(`/api/models/${scopeModel.id}`).flush({
      model: {
        ...scopeModel,
        packingList: [
          { name: 'Ureteroscope', gtin: null, quantity: 1, serialised: true },
          { name: 'Cleaning brush (pack of 5)', gtin: null, quantity: 2, serialised: false },
        ],
      },
    });
    await settle();
  });

  afterEach(() => http.verify());

  it('shows the unit’s calendar for the month of the first case day with the needed footprint', async () => {
    const holds = http.expectOne((r) => r.url === '/api/units/5/holds');
    // March 2027 with a week's margin before and two weeks after.
    expect(holds.request.params.get('from')).toBe('2027-02-22');
    expect(holds.request.params.get('to')).toBe('2027-04-14');
    holds.flush({
      items: [
        {
          id: 1,
          unitId: 5,
          kind: 'loan',
          start: '2027-03-10',
          end: '2027-03-20',
          loanId: null,
          loanReference: null,
          hospitalName: null,
          reason: null,
          label: 'Reserved',
        },
      ],
    });
    const check = http.expectOne((r) => r.url === '/api/availability');
    expect(check.request.params.get('modelId')).toBe(String(scopeModel.id));
    check.flush(
      availabilityResponse([
        availabilityItem({
          unitId: 5,
          serialNumber: 'MSU-0001',
          milestones: milestonesFor('2027-03-01', '2027-03-03'),
        }),
      ]),
    );
    await settle();
    expect(fixture.nativeElement.querySelector('ev-hold-calendar h3').textContent).toContain(
      'March 2027',
    );
    const shaded = (cls: string) =>
      Array.from(fixture.nativeElement.querySelectorAll(`td.${cls}`)).map(
        (td) => (td as HTMLElement).dataset['date'],
      );
    // Footprint: ship by 2027-02-22 … ready again 2027-03-10; it touches the hold on 2027-03-10.
    expect(shaded('conflict')).toEqual(['2027-03-10']);
    expect(shaded('reserved')).toContain('2027-03-20');
    expect(text()).toContain('Can be there for these dates');
    expect(text()).toContain('340 km great-circle distance · 2 business days in transit each way');
    expect(text()).toContain('The map couldn’t be loaded');
    expect(text()).toContain('2 lines, 3 pieces; 1 serial-numbered');
  });

  it('goes back to the same search: filters and dates', async () => {
    fixture.componentRef.setInput('category', 'flexible_endoscope');
    fixture.componentRef.setInput('q', 'scope');
    fixture.componentRef.setInput('worksWith', '7');
    http.expectOne((r) => r.url === '/api/units/5/holds').flush({ items: [] });
    http
      .expectOne((r) => r.url === '/api/availability')
      .flush(
        availabilityResponse([
          availabilityItem({
            unitId: 5,
            serialNumber: 'MSU-0001',
            milestones: milestonesFor('2027-03-01', '2027-03-03'),
          }),
        ]),
      );
    await settle();
    const back = Array.from(
      (fixture.nativeElement as HTMLElement).querySelectorAll<HTMLAnchorElement>('a'),
    ).find((a) => a.textContent?.includes('Back to results'));
    const url = new URL(back!.href, 'http://localhost');
    expect(url.pathname).toBe('/equipment');
    expect(Object.fromEntries(url.searchParams)).toEqual({
      category: 'flexible_endoscope',
      q: 'scope',
      worksWith: '7',
      siteId: '11',
      from: '2027-03-01',
      to: '2027-03-03',
    });
  });

  it('adds the unit to the request', async () => {
    http.expectOne((r) => r.url === '/api/units/5/holds').flush({ items: [] });
    http
      .expectOne((r) => r.url === '/api/availability')
      .flush(availabilityResponse([availabilityItem({ unitId: 5, serialNumber: 'MSU-0001' })]));
    await settle();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add to request/ }))).click();
    const draft = TestBed.inject(LoanDraft);
    expect(draft.units().map((u) => u.unitId)).toEqual([5]);
    expect(draft.value()).toEqual(
      expect.objectContaining({ siteId: 11, useFrom: '2027-03-01', useTo: '2027-03-03' }),
    );
    expect(
      await loader.getAllHarnesses(MatButtonHarness.with({ text: /Review request \(1\)/ })),
    ).toHaveLength(1);
  });
});
