import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { errorInterceptor } from '../../core/interceptors';
import { ProctorAvailability } from './proctor-availability';

const rule = 'DTSTART;TZID=America/Chicago:20270104T080000\nRRULE:FREQ=WEEKLY;BYDAY=MO,WE,FR';

/** The parts of a profile the availability editor reads. */
const profile = {
  homeTimeZone: 'America/Chicago',
  availability: {
    rules: [rule],
    exceptions: [{ kind: 'date', date: '2027-06-07' }],
    blackouts: [],
  },
};

const preview = (extraAvailable: boolean) => ({
  timeZone: 'America/Chicago',
  days: [
    { date: '2027-06-07', available: false, why: 'exception' },
    { date: '2027-06-12', available: extraAvailable, why: extraAvailable ? null : 'no_rule' },
  ],
});

describe('ProctorAvailability: exceptions', () => {
  it('adds an extra day, names a missing date, shows the server’s message, then reloads the preview', async () => {
    TestBed.configureTestingModule({
      providers: [
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        provideRouter([]),
      ],
    });
    const fixture = TestBed.createComponent(ProctorAvailability);
    const http = TestBed.inject(HttpTestingController);
    http.expectOne('/api/proctors/me').flush({ profile });
    http.expectOne('/api/proctors/me/availability/preview').flush(preview(false));
    await fixture.whenStable();
    const page = fixture.nativeElement as HTMLElement;
    const loader = TestbedHarnessEnvironment.loader(fixture);
    expect(page.querySelector<HTMLInputElement>('input[aria-label="Day off 1"]')).not.toBeNull();

    await (await loader.getHarness(MatButtonHarness.with({ text: /Add an extra day/ }))).click();
    const save = await loader.getHarness(MatButtonHarness.with({ text: /Save availability/ }));
    await save.click();
    // The new row has no date yet: nothing is sent, the row says what is missing.
    http.expectNone('/api/proctors/me/availability');
    expect(page.textContent).toContain('Choose the day.');

    const extra = page.querySelector<HTMLInputElement>('input[aria-label="Extra day 2"]')!;
    extra.value = '2027-06-07';
    extra.dispatchEvent(new Event('input'));
    await fixture.whenStable();
    await save.click();
    const refused = http.expectOne('/api/proctors/me/availability');
    expect(refused.request.body.exceptions).toEqual([
      { kind: 'date', date: '2027-06-07' },
      { kind: 'extra', date: '2027-06-07' },
    ]);
    refused.flush(
      {
        error: {
          code: 'validation_failed',
          message: 'Check the highlighted fields.',
          details: {
            fieldErrors: {
              'exceptions.1.date': ['2027-06-07 is both taken out and added; keep one of the two.'],
            },
            formErrors: [],
          },
        },
      },
      { status: 422, statusText: 'Unprocessable Entity' },
    );
    await fixture.whenStable();
    expect(page.textContent).toContain('is both taken out and added; keep one of the two.');

    extra.value = '2027-06-12';
    extra.dispatchEvent(new Event('input'));
    await fixture.whenStable();
    await save.click();
    const ok = http.expectOne('/api/proctors/me/availability');
    expect(ok.request.body.exceptions[1]).toEqual({ kind: 'extra', date: '2027-06-12' });
    ok.flush({ profile });
    // Saving reloads the 8-week preview, which now shows the extra Saturday as available.
    http.expectOne('/api/proctors/me/availability/preview').flush(preview(true));
    await fixture.whenStable();
    const cell = [...page.querySelectorAll('[role="gridcell"]')].find((c) =>
      c.getAttribute('title')?.startsWith('2027-06-12'),
    )!;
    expect(cell.classList.contains('on')).toBe(true);
    expect(page.textContent).toContain('Saved.');
    http.verify();
  });
});
