import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { Visit } from '@evalon/contracts';
import { SessionStore } from '../../core/session-store';
import { todayIn } from '../../shared/iso-date';
import { membership, person } from '../../testing/people';
import { ProctorCalendar, monthGrid, shiftMonth } from './proctor-calendar';

const visit = (over: Partial<Visit>): Visit => ({
  id: 1,
  reference: 'PV-2027-000001',
  kind: 'proctoring',
  state: 'accepted',
  hospitalId: 3,
  hospitalName: 'Velmora Health',
  siteId: 4,
  siteName: 'North Campus',
  siteTimeZone: 'America/New_York',
  jurisdiction: 'US-MA',
  modelId: 5,
  modelName: 'Model R2',
  loanId: null,
  from: '2027-03-16',
  to: '2027-03-17',
  cases: 3,
  language: null,
  note: null,
  proctorId: 101,
  proctorName: 'Dr Example',
  // A visit beyond the travel-day threshold: the matching package put one day on each side.
  busyFrom: '2027-03-15',
  busyTo: '2027-03-18',
  travelDays: 2,
  feeEstimate: null,
  currentOffer: null,
  createdAt: '2027-02-01T12:00:00Z',
  ...over,
});

describe('monthGrid', () => {
  it('lays March 2027 out in Monday-first weeks with travel days around the case days', () => {
    // 1 March 2027 is a Monday (proleptic Gregorian calendar; derived); March has 31 days.
    const weeks = monthGrid(
      '2027-03',
      '2027-03-10',
      [{ date: '2027-03-10', available: true, why: null }],
      [visit({})],
    );
    expect(weeks).toHaveLength(5);
    expect(weeks[0]![0]!.date).toBe('2027-03-01');
    expect(weeks[4]![2]!.date).toBe('2027-03-31');
    expect(weeks[4]![3]!.inMonth).toBe(false);
    const byDate = new Map(weeks.flat().map((d) => [d.date, d]));
    expect(byDate.get('2027-03-15')).toMatchObject({ travel: true, visit: { id: 1 } });
    expect(byDate.get('2027-03-16')).toMatchObject({ travel: false, visit: { id: 1 } });
    expect(byDate.get('2027-03-18')).toMatchObject({ travel: true });
    expect(byDate.get('2027-03-19')).toMatchObject({ travel: false, visit: null });
    expect(byDate.get('2027-03-10')).toMatchObject({ isToday: true, available: true });
    expect(byDate.get('2027-03-11')!.label).toBe('2027-03-11, outside your availability');
  });

  it('moves across year ends', () => {
    expect(shiftMonth('2027-12', 1)).toBe('2028-01');
    expect(shiftMonth('2027-01', -1)).toBe('2026-12');
  });
});

describe('ProctorCalendar', () => {
  it('loads the month with availability and visits, marks today, and pages with the keyboard', async () => {
    TestBed.configureTestingModule({
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    TestBed.inject(SessionStore).setUser(
      person([membership('zelvara', 'proctor')], { timeZone: 'America/Chicago' }),
    );
    const fixture = TestBed.createComponent(ProctorCalendar);
    const http = TestBed.inject(HttpTestingController);
    const today = todayIn('America/Chicago');
    const month = today.slice(0, 7);
    http
      .expectOne(
        (r) => r.url === '/api/proctors/me/availability/preview' && r.params.get('month') === month,
      )
      .flush({ timeZone: 'America/Chicago', days: [{ date: today, available: true, why: null }] });
    http
      .expectOne((r) => r.url === '/api/visits' && r.params.get('role') === 'proctor')
      .flush({
        items: [
          visit({ from: today, to: today, busyFrom: today, busyTo: today }),
          // Another proctor's visit and a declined one are not on this calendar.
          visit({ id: 2, reference: 'PV-2027-000002', proctorId: 999, from: today, to: today }),
        ],
      });
    await fixture.whenStable();
    const page = fixture.nativeElement as HTMLElement;
    const cell = page.querySelector(`td[data-date="${today}"]`)!;
    expect(cell.getAttribute('aria-current')).toBe('date');
    expect(cell.classList.contains('visit')).toBe(true);
    expect(cell.querySelector('a')!.getAttribute('href')).toBe('/visits/1');
    expect(page.textContent).not.toContain('PV-2027-000002');
    expect(page.querySelector('.legend')!.textContent).toContain('travel day');

    page.dispatchEvent(new KeyboardEvent('keydown', { key: 'PageDown' }));
    const next = shiftMonth(month, 1);
    http
      .expectOne((r) => r.params.get('month') === next)
      .flush({ timeZone: 'America/Chicago', days: [] });
    http.expectOne((r) => r.url === '/api/visits').flush({ items: [] });
    await fixture.whenStable();
    expect(page.textContent).toContain('No accepted visits this month.');
    http.verify();
  });
});
