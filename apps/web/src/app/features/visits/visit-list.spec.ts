import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatTableHarness } from '@angular/material/table/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { Visit } from '@evalon/contracts';
import { visit as visitFixture } from '../../testing/visits';
import { VisitList } from './visit-list';

const visit = (over: Partial<Visit>): Visit =>
  visitFixture({ hospitalName: 'Invented Hospital', ...over });

describe('VisitList', () => {
  it('lists the hospital’s visits with who holds or accepted each', async () => {
    TestBed.configureTestingModule({
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    const fixture = TestBed.createComponent(VisitList);
    const http = TestBed.inject(HttpTestingController);
    http
      .expectOne((r) => r.url === '/api/visits' && r.params.get('role') === 'hospital')
      .flush({
        items: [
          visit({
            currentOffer: {
              id: 9,
              proctorId: 7,
              proctorName: 'Dr Example',
              position: 1,
              state: 'offered',
              score: 80,
              offeredAt: '2027-02-01T12:00:00Z',
              deadlineAt: '2027-02-03T12:00:00Z',
              answeredAt: null,
              reason: null,
            },
          }),
          visit({
            id: 2,
            reference: 'PV-2027-000002',
            state: 'accepted',
            proctorId: 8,
            proctorName: 'Dr Accepted',
            feeEstimate: { amount: 500_000, currency: 'USD' },
          }),
        ],
      });
    await fixture.whenStable();
    const table = await TestbedHarnessEnvironment.loader(fixture).getHarness(MatTableHarness);
    const rows = await table.getCellTextByColumnName();
    expect(rows['reference']?.text).toEqual(['PV-2027-000001', 'PV-2027-000002']);
    expect(rows['state']?.text).toEqual(['Waiting for a proctor', 'Accepted']);
    expect(rows['proctor']?.text).toEqual(['Offered to Dr Example', 'Dr Accepted']);
    expect(rows['fee']?.text).toEqual(['—', '$5,000.00']);
    http.verify();
  });
});
