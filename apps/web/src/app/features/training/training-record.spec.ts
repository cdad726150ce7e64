import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { TrainingRecord } from '@evalon/contracts';
import { SessionStore } from '../../core/session-store';
import { membership, person } from '../../testing/people';
import { TrainingRecordPage } from './training-record';

const ratings = {
  setup: 4,
  docking: 3,
  instrument_handling: 4,
  troubleshooting: 3,
  team_communication: 5,
};

async function open(record: TrainingRecord) {
  TestBed.configureTestingModule({
    providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
  });
  TestBed.inject(SessionStore).setUser(person([membership('velmora', 'clinician')]));
  const fixture = TestBed.createComponent(TrainingRecordPage);
  const http = TestBed.inject(HttpTestingController);
  http.expectOne('/api/visits/training-record').flush(record);
  await fixture.whenStable();
  http.verify();
  return fixture.nativeElement as HTMLElement;
}

describe('TrainingRecordPage', () => {
  it('says so when the clinician has no cases yet', async () => {
    const page = await open({
      trainee: { userId: 101, name: 'Dana Whitlock' },
      progress: [],
      visits: [],
    });
    expect(page.textContent).toContain('No supervised cases yet');
    expect(page.querySelector('table.cases')).toBeNull();
  });

  it('shows cases with role and ratings, the count against the threshold and the sign-off PDF', async () => {
    const page = await open({
      trainee: { userId: 101, name: 'Dana Whitlock' },
      progress: [
        {
          hospitalId: 7,
          hospitalName: 'Velmora Health',
          modelId: 5,
          modelName: 'Model R2',
          supervisedCases: 2,
          threshold: 3,
          signedOff: false,
        },
      ],
      visits: [
        {
          visitId: 1,
          reference: 'PV-2027-000001',
          state: 'accepted',
          hospitalName: 'Velmora Health',
          siteName: 'North Campus',
          siteTimeZone: 'America/New_York',
          modelId: 5,
          modelName: 'Model R2',
          from: '2027-03-16',
          to: '2027-03-17',
          proctorName: 'Dr Example',
          cases: [
            { caseNumber: 1, traineeRole: 'observed', ratings, recordedAt: '2027-03-16T14:00:00Z' },
            {
              caseNumber: 3,
              traineeRole: 'performed_supervised',
              ratings,
              recordedAt: '2027-03-16T18:00:00Z',
            },
          ],
          signOff: {
            id: 9,
            signedAt: '2027-03-17T20:00:00Z',
            proctoredCases: 3,
            threshold: 3,
            pdfUrl: '/api/visits/1/sign-offs/9/pdf',
          },
        },
      ],
    });
    const meter = page.querySelector('[role="meter"]')!;
    expect(meter.getAttribute('aria-valuenow')).toBe('2');
    expect(meter.getAttribute('aria-valuemax')).toBe('3');
    expect(page.textContent).toContain('2 of 3 cases performed under supervision');
    const rows = [...page.querySelectorAll('table.cases tbody tr')].map((r) =>
      [...r.querySelectorAll('td')].map((td) => td.textContent!.trim()),
    );
    expect(rows[0]!.slice(0, 3)).toEqual(['1', 'Observed', '4/5']);
    expect(rows[1]!.slice(0, 2)).toEqual(['3', 'Performed under supervision']);
    const pdf = page.querySelector<HTMLAnchorElement>('.sign-off a')!;
    expect(pdf.getAttribute('href')).toBe('/api/visits/1/sign-offs/9/pdf');
    expect(pdf.textContent).toContain('Record (PDF)');
  });
});
