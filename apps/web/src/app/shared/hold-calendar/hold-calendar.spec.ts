import { ChangeDetectionStrategy, Component, signal } from '@angular/core';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { CalendarHold, CalendarRange, HoldCalendar, calendarDays } from './hold-calendar';

// Weekdays of the dates used here were checked against a perpetual calendar: 2027-01-31 is a
// Sunday and 2027-02-01 a Monday (February 2027 starts on a Monday and has 28 days).
const holds: CalendarHold[] = [
  { id: 1, kind: 'loan', start: '2027-01-28', end: '2027-02-03', label: 'EV-2027-000012' },
  { id: 2, kind: 'maintenance', start: '2027-02-10', end: '2027-02-11', label: 'In maintenance' },
];

@Component({
  imports: [HoldCalendar],
  template: `
    <ev-hold-calendar
      [holds]="holds"
      [(month)]="month"
      [highlight]="highlight()"
      [firstDayOfWeek]="firstDay()"
      today="2027-02-08"
      (dayActivated)="activated.set($event.date)"
    />
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
class Host {
  readonly holds = holds;
  readonly month = signal('2027-02');
  readonly highlight = signal<CalendarRange | null>(null);
  readonly firstDay = signal(7);
  readonly activated = signal<string | null>(null);
}

describe('HoldCalendar', () => {
  let fixture: ComponentFixture<Host>;
  let host: Host;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      providers: [{ provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    fixture = TestBed.createComponent(Host);
    host = fixture.componentInstance;
    await fixture.whenStable();
  });

  const cells = () =>
    Array.from(fixture.nativeElement.querySelectorAll('td[role="gridcell"]')) as HTMLElement[];
  const datesWith = (cls: string) =>
    cells()
      .filter((c) => c.classList.contains(cls))
      .map((c) => c.dataset['date']);
  const cell = (date: string) =>
    fixture.nativeElement.querySelector(`td[data-date="${date}"]`) as HTMLElement;

  it('shades the days of a hold that runs across the month boundary, and maintenance', () => {
    expect(cells()).toHaveLength(42);
    // Sunday start: the grid opens on Sunday 2027-01-31, a day of January shown for context.
    expect(cells()[0]!.dataset['date']).toBe('2027-01-31');
    expect(cell('2027-01-31').classList).toContain('outside');
    expect(datesWith('reserved')).toEqual(['2027-01-31', '2027-02-01', '2027-02-02', '2027-02-03']);
    expect(datesWith('maintenance')).toEqual(['2027-02-10', '2027-02-11']);
    expect(cell('2027-02-04').getAttribute('aria-label')).toBe('Thursday, February 4, 2027: Free');
    expect(cell('2027-02-02').getAttribute('aria-label')).toBe(
      'Tuesday, February 2, 2027: Reserved (EV-2027-000012)',
    );
    expect(cell('2027-02-08').getAttribute('aria-current')).toBe('date');
    expect(fixture.nativeElement.querySelector('.legend').textContent).toContain('Maintenance');
  });

  it('shades the start of the same hold in the previous month, Monday first', async () => {
    host.firstDay.set(1);
    host.month.set('2027-01');
    await fixture.whenStable();
    // January 2027 starts on a Friday: with Monday first the grid opens on Monday 2026-12-28 and
    // its last row runs into February, whose first three days are still under the hold.
    expect(cells()[0]!.dataset['date']).toBe('2026-12-28');
    expect(datesWith('reserved')).toEqual([
      '2027-01-28',
      '2027-01-29',
      '2027-01-30',
      '2027-01-31',
      '2027-02-01',
      '2027-02-02',
      '2027-02-03',
    ]);
    expect(cells().at(-1)!.dataset['date']).toBe('2027-02-07');
  });

  it('outlines the highlighted range and marks the days where it meets a hold', async () => {
    host.highlight.set({ start: '2027-02-03', end: '2027-02-06', label: 'Needed for your dates' });
    await fixture.whenStable();
    expect(datesWith('highlighted')).toEqual([
      '2027-02-03',
      '2027-02-04',
      '2027-02-05',
      '2027-02-06',
    ]);
    expect(datesWith('conflict')).toEqual(['2027-02-03']);
    expect(fixture.nativeElement.querySelector('.legend').textContent).toContain(
      'Needed for your dates',
    );
  });

  it('moves between months with the buttons and tells the parent', async () => {
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const next = await loader.getHarness(MatButtonHarness.with({ selector: '.next' }));
    expect(await (await next.host()).getAttribute('aria-label')).toBe('Next month, March 2027');
    await next.click();
    expect(host.month()).toBe('2027-03');
    expect(fixture.nativeElement.querySelector('h3').textContent).toContain('March 2027');
    expect(datesWith('reserved')).toEqual([]);
    const previous = await loader.getHarness(MatButtonHarness.with({ selector: '.previous' }));
    await previous.click();
    await previous.click();
    expect(host.month()).toBe('2027-01');
  });

  it('moves focus with the keyboard, across the month end, and activates a day', async () => {
    // One day takes Tab: today, when it is in the month shown.
    expect(
      cells()
        .filter((c) => c.tabIndex === 0)
        .map((c) => c.dataset['date']),
    ).toEqual(['2027-02-08']);
    const press = async (date: string, key: string) => {
      cell(date).dispatchEvent(new KeyboardEvent('keydown', { key, bubbles: true }));
      await fixture.whenStable();
    };
    await press('2027-02-08', 'ArrowDown');
    expect(document.activeElement).toBe(cell('2027-02-15'));
    await press('2027-02-15', 'End');
    // Sunday first: the week of 2027-02-15 ends on Saturday 2027-02-20.
    expect(document.activeElement).toBe(cell('2027-02-20'));
    await press('2027-02-20', 'ArrowDown');
    await press('2027-02-27', 'ArrowRight');
    expect(host.month()).toBe('2027-02');
    expect(document.activeElement).toBe(cell('2027-02-28'));
    // Past the last day of February the grid turns to March, with focus on March 1.
    await press('2027-02-28', 'ArrowRight');
    expect(host.month()).toBe('2027-03');
    expect(document.activeElement).toBe(cell('2027-03-01'));
    expect(cell('2027-03-01').classList).not.toContain('outside');
    await press('2027-03-01', 'PageUp');
    expect(host.month()).toBe('2027-02');
    expect(document.activeElement).toBe(cell('2027-02-01'));
    await press('2027-02-01', 'Enter');
    expect(host.activated()).toBe('2027-02-01');

    // Keys typed faster than the grid redraws land on the old cell: they still count from the
    // day the last key moved to.
    const old = cell('2027-02-01');
    old.dispatchEvent(new KeyboardEvent('keydown', { key: 'PageDown', bubbles: true }));
    old.dispatchEvent(new KeyboardEvent('keydown', { key: 'ArrowRight', bubbles: true }));
    await fixture.whenStable();
    expect(host.month()).toBe('2027-03');
    expect(document.activeElement).toBe(cell('2027-03-02'));
  });
});

describe('calendarDays', () => {
  it('starts the grid on the chosen weekday and counts 42 days', () => {
    const monday = calendarDays('2027-02', holds, null, '2027-02-08', 1);
    expect(monday[0]!.date).toBe('2027-02-01');
    expect(monday.filter((d) => d.inMonth)).toHaveLength(28);
    const sunday = calendarDays('2027-02', holds, null, '2027-02-08', 7);
    expect(sunday[0]!.date).toBe('2027-01-31');
    expect(sunday.at(-1)!.date).toBe('2027-03-13');
  });
});
