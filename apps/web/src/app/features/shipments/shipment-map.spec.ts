import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import type { ShipmentMapEntry } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { ShipmentMap } from './shipment-map';

const leg = (over: Partial<ShipmentMapEntry> = {}): ShipmentMapEntry => ({
  id: 1,
  reference: 'EV-2027-000001-O1',
  loanReference: 'EV-2027-000001',
  hospitalName: 'A Hospital',
  direction: 'outbound',
  state: 'in_transit',
  trackingNumber: 'WP0000000001',
  dueBy: '2027-01-08',
  eta: '2027-01-07',
  risk: 'on_time',
  from: { name: 'East Depot', lat: 40.5, lng: -74.3 },
  to: { name: 'North Campus', lat: 42.3, lng: -71.1 },
  ...over,
});

async function render() {
  TestBed.configureTestingModule({
    providers: [
      provideRouter([]),
      provideHttpClient(withInterceptors([errorInterceptor])),
      provideHttpClientTesting(),
      { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
    ],
  });
  const http = TestBed.inject(HttpTestingController);
  const fixture = TestBed.createComponent(ShipmentMap);
  await fixture.whenStable();
  // The maps script is not loaded in unit tests: its config request fails, the list stays.
  http.expectOne('/api/config/maps').flush('down', { status: 503, statusText: 'Unavailable' });
  return { http, fixture };
}

const settle = async (fixture: { whenStable(): Promise<unknown> }) => {
  await new Promise((resolve) => setTimeout(resolve));
  await fixture.whenStable();
};

describe('ShipmentMap', () => {
  it('lists every leg in transit beside the map with its risk, route and dates', async () => {
    const { http, fixture } = await render();
    http.expectOne('/api/shipments/in-transit').flush({
      shipments: [
        leg(),
        leg({
          id: 2,
          reference: 'EV-2027-000002-R1',
          direction: 'return',
          risk: 'overdue',
          dueBy: '2027-01-20',
          from: { name: 'North Campus', lat: 42.3, lng: -71.1 },
          to: { name: 'East Depot', lat: 40.5, lng: -74.3 },
        }),
      ],
      total: 2,
    });
    await settle(fixture);
    const items = Array.from(
      fixture.nativeElement.querySelectorAll('ul.legs li') as NodeListOf<HTMLElement>,
    );
    expect(items).toHaveLength(2);
    expect(items[0]!.textContent).toContain('Outbound: East Depot → North Campus');
    expect(items[1]!.textContent).toContain('Return: North Campus → East Depot');
    expect(items[1]!.querySelector('.risk')!.textContent!.trim()).toBe('Overdue');
    expect(items[1]!.textContent).toMatch(/back\s+at depot by/);
    const legend = (fixture.nativeElement.querySelector('.legend') as HTMLElement).textContent;
    expect(legend).toMatch(/On time · 1/);
    expect(legend).toMatch(/Overdue · 1/);
    // The map could not load; the page says so and the list still works by keyboard.
    expect(fixture.nativeElement.textContent).toContain('The map couldn’t be loaded');
    const show = items[1]!.querySelector('button') as HTMLButtonElement;
    expect(show.getAttribute('aria-label')).toBe('Show EV-2027-000002-R1 on the map');
    show.click();
    await settle(fixture);
    expect(show.getAttribute('aria-pressed')).toBe('true');
    http.verify();
  });

  it('says when nothing is with the carrier, and offers a retry on an error', async () => {
    const { http, fixture } = await render();
    http
      .expectOne('/api/shipments/in-transit')
      .flush(
        { error: { code: 'server_error', message: 'Something went wrong.' } },
        { status: 500, statusText: 'Error' },
      );
    await settle(fixture);
    expect(fixture.nativeElement.textContent).toContain('The shipments couldn’t be loaded');
    (Array.from(fixture.nativeElement.querySelectorAll('button')) as HTMLButtonElement[])
      .find((b) => b.textContent!.includes('Try again'))!
      .click();
    http.expectOne('/api/shipments/in-transit').flush({ shipments: [], total: 0 });
    await settle(fixture);
    expect(fixture.nativeElement.textContent).toContain('Nothing is with the carrier right now');
    http.verify();
  });
});
