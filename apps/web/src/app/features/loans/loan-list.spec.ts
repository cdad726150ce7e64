import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import {
  HttpTestingController,
  TestRequest,
  provideHttpClientTesting,
} from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatChipListboxHarness } from '@angular/material/chips/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatPaginatorHarness } from '@angular/material/paginator/testing';
import { MatSortHeaderHarness } from '@angular/material/sort/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { Router, provideRouter } from '@angular/router';
import { loanStates, type Loan } from '@evalon/contracts';
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

  /**
   * Lets answers and timers land and the view update. Not `whenStable()`: a list request on its
   * way keeps the app unstable until the test answers it.
   */
  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve));
    fixture.detectChanges();
    await new Promise((resolve) => setTimeout(resolve));
  };

  /** Clicks through the DOM (a harness click would wait for the request the click sends). */
  async function click(element: Element | null | undefined): Promise<void> {
    expect(element).toBeTruthy();
    (element as HTMLElement).click();
    await settle();
  }

  const buttonWith = (text: string) =>
    [...(fixture.nativeElement as HTMLElement).querySelectorAll('button')].find((b) =>
      b.textContent?.includes(text),
    );

  /** The next list request, checked to carry `params`. */
  function nextRequest(params: Record<string, string> = {}): TestRequest {
    const request = http.expectOne((r) => r.method === 'GET' && r.url === '/api/loans');
    for (const [name, value] of Object.entries(params)) {
      expect(request.request.params.get(name)).toBe(value);
    }
    return request;
  }

  /** Answers a list request: `page` as the rows, `all` for the counts per state. */
  async function answerWith(
    request: TestRequest,
    page: Loan[],
    options: { total?: number; all?: Loan[]; page?: number } = {},
  ): Promise<void> {
    const all = options.all ?? page;
    const stateCounts = loanStates
      .map((state) => ({ state, count: all.filter((l) => l.state === state).length }))
      .filter((c) => c.count > 0);
    request.flush({
      items: page,
      total: options.total ?? page.length,
      page: options.page ?? 0,
      size: 10,
      stateCounts,
    });
    await settle();
  }

  /** The loans newest request first, as the server answers by default. */
  const newestFirst = [...loans].sort((a, b) => b.createdAt.localeCompare(a.createdAt));

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
    await TestBed.inject(Router).navigateByUrl('/');
    fixture = TestBed.createComponent(LoanList);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await settle();
  }

  /** Answers the first request (first page, newest request first) with `items`. */
  async function answer(items: Loan[] = newestFirst): Promise<void> {
    const request = nextRequest({ page: '0', size: '10', sort: 'requested,desc' });
    await answerWith(request, items);
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

  it('asks the server to sort by deposit, then the other way', async () => {
    await create();
    await answer();
    await click(fixture.nativeElement.querySelector('th.mat-column-deposit'));
    const byDeposit = [...loans].sort((a, b) => a.deposit.amount - b.deposit.amount);
    await answerWith(nextRequest({ sort: 'deposit,asc', page: '0' }), byDeposit);
    expect(await column('deposit')).toEqual(['$9,500.00', '$28,475.00', '$40,000.00']);
    await click(fixture.nativeElement.querySelector('th.mat-column-deposit'));
    await answerWith(nextRequest({ sort: 'deposit,desc' }), [...byDeposit].reverse());
    expect(await column('deposit')).toEqual(['$40,000.00', '$28,475.00', '$9,500.00']);
    expect(TestBed.inject(Router).url).toBe('/?sort=deposit,desc');
    const header = await loader.getHarness(MatSortHeaderHarness.with({ label: 'Deposit' }));
    expect(await header.getSortDirection()).toBe('desc');
  });

  it('asks the server for words and state chips, and offers the states with their counts', async () => {
    await create();
    await answer();
    const filter = await loader.getHarness(
      MatInputHarness.with({ selector: 'input[type="search"]' }),
    );
    await filter.setValue('lakefront');
    await new Promise((resolve) => setTimeout(resolve, 350)); // the search waits for a pause
    await answerWith(nextRequest({ q: 'lakefront', page: '0' }), [loans[1]!], {
      all: [loans[1]!],
    });
    expect(await column('reference')).toEqual(['EV-2026-000002']);
    expect(fixture.nativeElement.querySelector('.summary').textContent.trim()).toBe('1 loan');
    await filter.setValue('');
    await new Promise((resolve) => setTimeout(resolve, 350));
    await answerWith(nextRequest(), newestFirst);

    const chips = await loader.getHarness(MatChipListboxHarness);
    const options = await chips.getChips();
    expect(await Promise.all(options.map((c) => c.getText()))).toEqual([
      'Waiting for lender (1)',
      'Approved — deposit due (1)',
      'Declined (1)',
    ]);
    await click(buttonWith('Waiting for lender (1)') ?? null);
    await answerWith(nextRequest({ state: 'requested' }), [loans[1]!], {
      all: newestFirst,
    });
    expect(fixture.nativeElement.querySelector('.summary').textContent.trim()).toBe('1 of 3 loans');
    await click(buttonWith('Declined (1)') ?? null);
    await answerWith(nextRequest({ state: 'requested,declined' }), [loans[2]!, loans[1]!], {
      all: newestFirst,
    });
    expect(await column('reference')).toEqual(['EV-2026-000003', 'EV-2026-000002']);
    expect(TestBed.inject(Router).url).toBe('/?state=requested,declined');

    await filter.setValue('nothing like this');
    await new Promise((resolve) => setTimeout(resolve, 350));
    await answerWith(nextRequest({ q: 'nothing like this', state: 'requested,declined' }), []);
    expect(fixture.nativeElement.textContent).toContain('No loans match these filters.');
    await click(buttonWith('Show all loans'));
    const all = nextRequest();
    expect(all.request.params.has('q')).toBe(false);
    expect(all.request.params.has('state')).toBe(false);
    await answerWith(all, newestFirst);
    expect(await column('reference')).toHaveLength(3);
  });

  it('pages through many loans ten at a time, keeping the page in the URL', async () => {
    await create();
    const many = Array.from({ length: 23 }, (_, i) =>
      loan({
        id: 23 - i,
        reference: `EV-2026-${String(23 - i).padStart(6, '0')}`,
        state: 'requested',
        createdAt: new Date(Date.UTC(2026, 10, 23 - i)).toISOString(),
      }),
    );
    await answerWith(nextRequest({ page: '0', size: '10' }), many.slice(0, 10), {
      total: 23,
      all: many,
    });
    expect(await column('reference')).toHaveLength(10);
    expect((await column('reference'))[0]).toBe('EV-2026-000023');
    const paginator = await loader.getHarness(MatPaginatorHarness);
    expect(await paginator.getRangeLabel()).toBe('1 – 10 of 23');
    await click(fixture.nativeElement.querySelector('button[aria-label="Next page"]'));
    await answerWith(nextRequest({ page: '1' }), many.slice(10, 20), {
      total: 23,
      all: many,
      page: 1,
    });
    await click(fixture.nativeElement.querySelector('button[aria-label="Next page"]'));
    await answerWith(nextRequest({ page: '2' }), many.slice(20), { total: 23, all: many, page: 2 });
    expect(await column('reference')).toEqual([
      'EV-2026-000003',
      'EV-2026-000002',
      'EV-2026-000001',
    ]);
    expect(TestBed.inject(Router).url).toBe('/?page=2');
    expect(await paginator.getRangeLabel()).toBe('21 – 23 of 23');
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
    nextRequest().flush(
      { error: { code: 'internal', message: 'Loans are unavailable.' } },
      { status: 500, statusText: 'Error' },
    );
    await settle();
    expect(fixture.nativeElement.textContent).toContain('Loans couldn’t be loaded');
    await click(buttonWith('Try again'));
    await answer();
    expect(await column('reference')).toHaveLength(3);
  });
});
