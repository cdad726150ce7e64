import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatChipListboxHarness } from '@angular/material/chips/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatPaginatorHarness } from '@angular/material/paginator/testing';
import { MatSortHarness } from '@angular/material/sort/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import type { Loan } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { LOAN_DRAFT_KEY } from '../../shared/loan-draft';
import { campusChicago, loan, towerModel } from '../../testing/marketplace';
import { membership, person } from '../../testing/people';
import { LoanList } from './loan-list';

const loans: Loan[] = [
  loan({
    id: 1,
    reference: 'EV-2026-000001',
    state: 'approved',
    useFrom: '2026-12-28',
    useTo: '2027-01-01',
    deposit: { amount: 4_000_000, currency: 'USD' },
    createdAt: '2026-11-20T15:00:00.000Z',
  }),
  loan({
    id: 2,
    reference: 'EV-2026-000002',
    state: 'requested',
    useFrom: '2027-01-11',
    useTo: '2027-01-14',
    siteId: campusChicago.id,
    siteName: campusChicago.name,
    deposit: { amount: 2_847_500, currency: 'USD' },
    createdAt: '2026-11-25T15:00:00.000Z',
  }),
  loan({
    id: 3,
    reference: 'EV-2026-000003',
    state: 'declined',
    useFrom: '2027-01-25',
    useTo: '2027-01-27',
    units: [
      {
        ...loan({ id: 3, reference: 'x', state: 'declined' }).units[0]!,
        unitId: 30,
        modelId: towerModel.id,
        modelName: towerModel.name,
        serialNumber: 'MVT-0001',
      },
    ],
    deposit: { amount: 950_000, currency: 'USD' },
    createdAt: '2026-11-28T15:00:00.000Z',
  }),
];

describe('LoanList', () => {
  let fixture: ComponentFixture<LoanList>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  };

  async function create(role: 'buyer' | 'clinician' = 'buyer'): Promise<void> {
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
    TestBed.inject(SessionStore).setUser(person([membership('velmora', role)]));
    fixture = TestBed.createComponent(LoanList);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
  }

  async function answer(items: Loan[] = loans): Promise<void> {
    const request = http.expectOne((r) => r.url === '/api/loans');
    expect(request.request.params.get('limit')).toBe('500');
    request.flush({ items });
    await settle();
  }

  async function column(name: string): Promise<string[]> {
    const table = await loader.getHarness(MatTableHarness);
    const rows = await table.getRows();
    return Promise.all(rows.map(async (row) => (await row.getCellTextByColumnName())[name]!));
  }

  afterEach(() => http.verify());

  it('lists loans newest request first with plain state labels and deposits', async () => {
    await create();
    await answer();
    const table = await loader.getHarness(MatTableHarness);
    const headers = await (await table.getHeaderRows())[0]!.getCellTextByIndex();
    expect(headers).toEqual([
      'Reference',
      'Equipment',
      'Campus',
      'Case days',
      'State',
      'Deposit',
      'Requested on',
    ]);
    expect(await column('reference')).toEqual([
      'EV-2026-000003',
      'EV-2026-000002',
      'EV-2026-000001',
    ]);
    // The chip's label (beside its icon) is the contract's plain label for the state.
    const chipLabels = Array.from(
      fixture.nativeElement.querySelectorAll('td.mat-column-state ev-loan-state-chip span'),
    ).map((el) => (el as HTMLElement).textContent);
    expect(chipLabels).toEqual(['Declined', 'Waiting for lender', 'Approved — deposit due']);
    expect(await column('deposit')).toEqual(['$9,500.00', '$28,475.00', '$40,000.00']);
    expect(await column('window')).toEqual([
      'Jan 25 – 27, 2027',
      'Jan 11 – 14, 2027',
      'Dec 28, 2026 – Jan 1, 2027',
    ]);
    // Requested on, in the viewer's zone (America/New_York).
    expect(await column('requested')).toEqual(['Nov 28, 2026', 'Nov 25, 2026', 'Nov 20, 2026']);
    expect((await column('campus'))[1]).toBe('Velmora Lakefront Campus');
  });

  it('sorts by deposit', async () => {
    await create();
    await answer();
    const sort = await loader.getHarness(MatSortHarness);
    const [deposit] = await sort.getSortHeaders({ label: 'Deposit' });
    await deposit!.click();
    expect(await column('deposit')).toEqual(['$9,500.00', '$28,475.00', '$40,000.00']);
    await deposit!.click();
    expect(await column('deposit')).toEqual(['$40,000.00', '$28,475.00', '$9,500.00']);
  });

  it('filters by words and by state chips', async () => {
    await create();
    await answer();
    const filter = await loader.getHarness(
      MatInputHarness.with({ selector: 'input[type="search"]' }),
    );
    await filter.setValue('lakefront');
    expect(await column('reference')).toEqual(['EV-2026-000002']);
    expect(fixture.nativeElement.querySelector('.summary').textContent.trim()).toBe('1 of 3 loans');
    await filter.setValue('imaging tower');
    expect(await column('reference')).toEqual(['EV-2026-000003']);
    await filter.setValue('');

    const chips = await loader.getHarness(MatChipListboxHarness);
    const options = await chips.getChips();
    expect(await Promise.all(options.map((c) => c.getText()))).toEqual([
      'Waiting for lender (1)',
      'Approved — deposit due (1)',
      'Declined (1)',
    ]);
    await chips.selectChips({ text: 'Waiting for lender (1)' });
    await chips.selectChips({ text: 'Declined (1)' });
    expect(await column('reference')).toEqual(['EV-2026-000003', 'EV-2026-000002']);

    await filter.setValue('nothing like this');
    const table = await loader.getHarness(MatTableHarness);
    expect(await table.getRows()).toHaveLength(0);
    expect(fixture.nativeElement.textContent).toContain('No loans match these filters.');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Show all loans' }))).click();
    expect(await column('reference')).toHaveLength(3);
  });

  it('pages through many loans ten at a time', async () => {
    await create();
    const many = Array.from({ length: 23 }, (_, i) =>
      loan({
        id: i + 1,
        reference: `EV-2026-${String(i + 1).padStart(6, '0')}`,
        state: 'requested',
        createdAt: new Date(Date.UTC(2026, 10, 1 + i)).toISOString(),
      }),
    );
    await answer(many);
    expect(await column('reference')).toHaveLength(10);
    expect((await column('reference'))[0]).toBe('EV-2026-000023');
    const paginator = await loader.getHarness(MatPaginatorHarness);
    expect(await paginator.getRangeLabel()).toBe('1 – 10 of 23');
    await paginator.goToNextPage();
    await paginator.goToNextPage();
    expect(await column('reference')).toEqual([
      'EV-2026-000003',
      'EV-2026-000002',
      'EV-2026-000001',
    ]);
  });

  it('shows a buyer with no loans the way to Find equipment', async () => {
    await create();
    await answer([]);
    expect(fixture.nativeElement.textContent).toContain('No loans yet');
    const links = await loader.getAllHarnesses(MatButtonHarness.with({ text: /Find equipment/ }));
    expect(links.length).toBeGreaterThan(0);
    expect(await (await links.at(-1)!.host()).getAttribute('href')).toBe('/equipment');
  });

  it('lets clinicians read without request buttons', async () => {
    await create('clinician');
    await answer([]);
    expect(fixture.nativeElement.textContent).toContain(
      'When a buyer at your hospital requests a loan',
    );
    expect(
      await loader.getAllHarnesses(MatButtonHarness.with({ text: /Find equipment/ })),
    ).toHaveLength(0);
  });

  it('explains a failed load and tries again', async () => {
    await create();
    http
      .expectOne((r) => r.url === '/api/loans')
      .flush(
        { error: { code: 'internal', message: 'Loans are unavailable.' } },
        { status: 500, statusText: 'Error' },
      );
    await settle();
    expect(fixture.nativeElement.textContent).toContain('Loans couldn’t be loaded');
    await (await loader.getHarness(MatButtonHarness.with({ text: /Try again/ }))).click();
    await answer();
    expect(await column('reference')).toHaveLength(3);
  });
});
