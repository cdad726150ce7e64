import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatCardHarness } from '@angular/material/card/testing';
import { provideRouter } from '@angular/router';
import type { Loan, Membership, ShipmentSummary } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { addDays, formatDay, todayIn } from '../../shared/iso-date';
import { future, loan } from '../../testing/marketplace';
import { outboxMessage } from '../../testing/payments';
import { membership, person } from '../../testing/people';
import { visit } from '../../testing/visits';
import { Home, greetingFor } from './home';
import {
  approvalsSummary,
  arrivalsSummary,
  buyerLoansSummary,
  buyerVisitsSummary,
  outboxSummary,
  proctorOffersSummary,
  returnsSummary,
  shippingSummary,
} from './next-steps';

/** An answer the mocked API gives: a body, or an error status. */
type Answer = { body: unknown } | { status: number; message: string };

const approved = loan({
  id: 11,
  reference: 'EV-2026-000011',
  state: 'approved',
  useFrom: '2027-03-01',
  useTo: '2027-03-05',
  createdAt: '2026-11-20T10:00:00.000Z',
});
const requested = loan({
  id: 12,
  reference: 'EV-2026-000012',
  state: 'requested',
  useFrom: '2027-04-05',
  useTo: '2027-04-08',
  createdAt: '2026-11-25T10:00:00.000Z',
});
const confirmed = loan({ id: 13, reference: 'EV-2026-000013', state: 'confirmed' });
const closed = loan({ id: 14, reference: 'EV-2026-000014', state: 'closed' });
const declined = loan({ id: 15, reference: 'EV-2026-000015', state: 'declined' });

/** An invented return leg of a loan, in the shipments list's shape. */
const returnLeg = (id: number, state: ShipmentSummary['state']) =>
  ({
    id,
    reference: `SH-${id}`,
    loanId: id,
    loanReference: `EV-2027-00000${id}`,
    loanState: 'returning',
    direction: 'return',
    state,
    depotId: 1,
    depotName: 'East Depot',
    siteId: 2,
    siteName: 'North Campus',
    hospitalName: 'Velmora Health',
    carrier: null,
    trackingNumber: null,
    carrierStatus: null,
    dueBy: '2027-03-05',
    shipBy: '2027-03-03',
    eta: null,
    risk: 'on_time',
    itemsDone: 0,
    itemsTotal: 3,
    updatedAt: '2027-03-01T09:00:00Z',
  }) as ShipmentSummary;

const visitsUrl = '/api/visits';
const returnsUrl = '/api/shipments?direction=return&pageSize=100&sort=due';

describe('Home', () => {
  let http: HttpTestingController;

  /**
   * Renders Home for `memberships`, answering each API read by its URL (path and query) from
   * `answers`, and returns the page.
   */
  async function render(memberships: Membership[], given: Record<string, Answer> = {}) {
    // Visits and returns answer "none" unless a test says otherwise.
    const answers: Record<string, Answer> = {
      [visitsUrl]: { body: { items: [] } },
      [returnsUrl]: { body: { shipments: [], total: 0, page: 1, pageSize: 100 } },
      ...given,
    };
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(person(memberships));
    const fixture = TestBed.createComponent(Home);
    const loader: HarnessLoader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    const asked: string[] = [];
    for (const request of http.match(() => true)) {
      const url = request.request.urlWithParams;
      asked.push(url);
      const answer = answers[url];
      if (!answer) throw new Error(`Home asked for ${url}, which the test does not answer`);
      if ('body' in answer) request.flush(answer.body);
      else
        request.flush(
          { error: { code: 'test_failure', message: answer.message } },
          { status: answer.status, statusText: 'Failure' },
        );
    }
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
    return { fixture, loader, asked, text: () => fixture.nativeElement.textContent as string };
  }

  async function cardTexts(loader: HarnessLoader): Promise<string[]> {
    const cards = await loader.getAllHarnesses(MatCardHarness);
    return Promise.all(cards.map((c) => c.getText()));
  }

  afterEach(() => http.verify());

  it('greets the person by first name with the organisation and role', async () => {
    const { fixture } = await render([membership('velmora', 'buyer')], {
      '/api/loans?limit=500': { body: { items: [] } },
    });
    const header = fixture.nativeElement.querySelector('ev-page-header');
    expect(header.querySelector('h1').textContent).toMatch(
      /^Good (morning|afternoon|evening), Dana$/,
    );
    expect(header.textContent).toContain('Velmora Health · Hospital network · Hospital buyer');
  });

  it('gives a buyer without loans the empty states, plus Members', async () => {
    const { loader } = await render([membership('velmora', 'buyer')], {
      '/api/loans?limit=500': { body: { items: [closed, declined] } },
    });
    const cards = await cardTexts(loader);
    expect(cards).toHaveLength(3);
    expect(cards[0]).toContain('No evaluation loans yet');
    expect(cards[1]).toContain('No proctoring visits booked');
    expect(cards[2]).toContain('Members');
    const findEquipment = await loader.getHarness(
      MatButtonHarness.with({ text: /Find equipment/ }),
    );
    expect(await (await findEquipment.host()).getAttribute('href')).toBe('/equipment');
  });

  it('tells a buyer which loans need the deposit and which wait for the lender', async () => {
    const { fixture, asked } = await render([membership('velmora', 'buyer')], {
      '/api/loans?limit=500': { body: { items: [requested, confirmed, approved, closed] } },
    });
    expect(asked).toEqual(['/api/loans?limit=500', '/api/visits']);
    const card = fixture.nativeElement.querySelector('li mat-card') as HTMLElement;
    expect(card.querySelector('.headline')?.textContent).toBe('3 active loans · 1 needs a deposit');
    const items = Array.from(card.querySelectorAll('a.item')) as HTMLAnchorElement[];
    expect(
      items.map((a) => [a.querySelector('.item-title')?.textContent, a.getAttribute('href')]),
    ).toEqual([
      ['Secure the deposit for EV-2026-000011', '/loans/11'],
      ['Waiting for the lender: EV-2026-000012', '/loans/12'],
    ]);
    expect(items[0]!.querySelector('.item-detail')?.textContent).toBe(
      'Dralvik Medical Loans approved · cases Mar 1 – 5, 2027',
    );
  });

  it('tells a fleet manager how many requests wait, linking to approvals', async () => {
    const { fixture, asked } = await render([membership('dralvik', 'fleet_manager')], {
      '/api/loans?limit=500&state=requested': {
        body: { items: [requested, { ...approved, state: 'requested' }] },
      },
    });
    expect(asked).toEqual(['/api/loans?limit=500&state=requested']);
    const card = fixture.nativeElement.querySelector('li mat-card') as HTMLElement;
    expect(card.querySelector('.headline')?.textContent).toBe(
      '2 loan requests waiting for approval',
    );
    // Longest waiting first.
    expect(Array.from(card.querySelectorAll('.item-title')).map((e) => e.textContent)).toEqual([
      'EV-2026-000011 · Velmora Health',
      'EV-2026-000012 · Velmora Health',
    ]);
    expect(card.querySelector('a.item')?.getAttribute('href')).toBe('/approvals');
  });

  it('gives a coordinator the confirmed loans to ship, and no Members card', async () => {
    const { loader, fixture } = await render([membership('dralvik', 'coordinator')], {
      '/api/loans?limit=500&state=confirmed': { body: { items: [confirmed] } },
    });
    const cards = await cardTexts(loader);
    expect(cards.some((c) => c.includes('Members'))).toBe(false);
    expect(cards[0]).toContain('1 confirmed loan to ship');
    // The test loan's window is Mar 1–3, 2027; its ship-by is 7 days before the first case.
    expect(cards[0]).toContain('EV-2026-000013 ships by Mon, Feb 22, 2027');
    expect(cards[1]).toContain('No returns waiting for inspection');
    expect(fixture.nativeElement.querySelector('a.item').getAttribute('href')).toBe('/loans/13');
  });

  it('asks a coordinator to inspect the returns back at the depot', async () => {
    const { loader } = await render([membership('dralvik', 'coordinator')], {
      '/api/loans?limit=500&state=confirmed': { body: { items: [] } },
      [returnsUrl]: {
        body: { shipments: [returnLeg(2, 'received')], total: 1, page: 1, pageSize: 100 },
      },
    });
    const cards = await cardTexts(loader);
    expect(cards[1]).toContain('1 return to inspect');
    expect(cards[1]).toContain('Inspect EV-2027-000002');
  });

  it('gives a coordinator an honest empty state when nothing is confirmed', async () => {
    const { loader } = await render([membership('dralvik', 'coordinator')], {
      '/api/loans?limit=500&state=confirmed': { body: { items: [] } },
    });
    const cards = await cardTexts(loader);
    expect(cards.map((c) => c.includes('No shipments to pack today'))).toContain(true);
  });

  it('shows a clinician the loans coming to their campuses', async () => {
    // Dates ahead of today, so the loan is still upcoming whenever the test runs.
    const upcoming = loan({
      id: 16,
      reference: 'EV-2026-000016',
      state: 'confirmed',
      useFrom: future(30),
      useTo: future(32),
    });
    const { fixture } = await render([membership('velmora', 'clinician')], {
      '/api/loans?limit=500': { body: { items: [approved, upcoming, closed] } },
    });
    const card = fixture.nativeElement.querySelector('li mat-card') as HTMLElement;
    expect(card.querySelector('.headline')?.textContent).toBe('1 loan coming to your campuses');
    expect(card.querySelector('.item-title')?.textContent).toBe(
      'Dralvik U6 slim ureteroscope at Velmora East Campus',
    );
    expect(card.querySelector('.item-detail')?.textContent).toBe(
      `Arrives by ${formatDay(upcoming.milestones.deliverBy)} · first case ${formatDay(upcoming.useFrom)}`,
    );
  });

  it('counts the admin’s parked e-mails and links to the outbox', async () => {
    const { fixture } = await render([membership('dralvik', 'admin')], {
      '/api/admin/outbox?status=parked&limit=200': {
        body: { items: [outboxMessage({ id: 1, subject: 'Loan EV-2026-000011 approved' })] },
      },
    });
    const card = fixture.nativeElement.querySelector('li mat-card') as HTMLElement;
    expect(card.querySelector('h3')?.textContent).toContain('E-mail outbox');
    expect(card.querySelector('.headline')?.textContent).toBe('1 e-mail could not be delivered');
    expect(card.querySelector('a.item')?.getAttribute('href')).toBe('/outbox');
  });

  it('keeps the page when one card fails, and offers to try again', async () => {
    const { loader, text } = await render([membership('velmora', 'buyer')], {
      '/api/loans?limit=500': {
        status: 503,
        message: 'Something went wrong on our side. Try again in a moment.',
      },
    });
    const cards = await cardTexts(loader);
    expect(cards[0]).toContain('Evaluation loans couldn’t be loaded');
    expect(cards[0]).toContain('Something went wrong on our side.');
    expect(cards[1]).toContain('No proctoring visits booked');
    expect(text()).toContain('What Evalon does');
    await (await loader.getHarness(MatButtonHarness.with({ text: /Try again/ }))).click();
    http.expectOne('/api/loans?limit=500').flush({ items: [approved] });
    http.expectOne('/api/visits').flush({ items: [] });
    await new Promise((resolve) => setTimeout(resolve));
    expect((await cardTexts(loader))[0]).toContain('Secure the deposit for EV-2026-000011');
  });

  it('shows skeletons while the cards load', async () => {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(person([membership('dralvik', 'fleet_manager')]));
    const fixture = TestBed.createComponent(Home);
    await fixture.whenStable();
    const card = fixture.nativeElement.querySelector('li mat-card') as HTMLElement;
    expect(card.getAttribute('aria-busy')).toBe('true');
    expect(card.querySelectorAll('.skeleton .bone')).toHaveLength(3);
    expect(card.textContent).toContain('Loading Loan requests…');
    http.expectOne('/api/loans?limit=500&state=requested').flush({ items: [] });
  });

  it('explains what to do without any organisation', async () => {
    const { text } = await render([]);
    expect(text()).toContain('You aren’t part of an organisation yet');
  });

  it('shows the cautions in plain words', async () => {
    const { text } = await render([membership('velmora', 'clinician')], {
      '/api/loans?limit=500': { body: { items: [] } },
    });
    expect(text()).toContain('it does not certify anyone');
    expect(text()).toContain('manufacturer’s instructions for use');
    expect(text()).toContain('Case records are de-identified');
    expect(text()).toContain('estimates until the lender confirms');
    expect(text()).toContain(
      'Local regulations, contracts and licensed practice always come first.',
    );
  });
});

describe('next steps from loans', () => {
  const today = todayIn('America/New_York');

  it('leaves the buyer card empty without loans under way', () => {
    expect(buyerLoansSummary([closed, declined])).toBeNull();
    expect(buyerLoansSummary([confirmed])).toEqual({
      headline: '1 active loan',
      items: [],
      more: 0,
      quiet: 'Nothing needs you right now: your lenders are preparing the rest.',
    });
  });

  it('lists at most three items and counts the rest', () => {
    const many: Loan[] = Array.from({ length: 6 }, (_, i) =>
      loan({ id: 100 + i, reference: `EV-2026-00010${i}`, state: 'requested' }),
    );
    const summary = approvalsSummary(many)!;
    expect(summary.items).toHaveLength(3);
    expect(summary.more).toBe(3);
    expect(approvalsSummary([])).toBeNull();
  });

  it('marks loans to ship within two days, or late, as needing action', () => {
    const at = (id: number, shipBy: string): Loan => {
      const l = loan({
        id,
        reference: `EV-2026-${String(id).padStart(6, '0')}`,
        state: 'confirmed',
      });
      return { ...l, milestones: { ...l.milestones, shipBy } };
    };
    const summary = shippingSummary(
      [at(31, addDays(today, 5)), at(32, addDays(today, -1)), at(33, addDays(today, 2))],
      today,
    )!;
    expect(summary.items.map((i) => [i.key, i.tone, i.icon])).toEqual([
      ['loan-32', 'action', 'warning'],
      ['loan-33', 'action', 'local_shipping'],
      ['loan-31', 'info', 'local_shipping'],
    ]);
    expect(summary.items[0]!.text).toMatch(/^EV-2026-000032 was due to ship /);
  });

  it('leaves out loans whose cases are over, and counts a full outbox page as more', () => {
    const past = loan({
      id: 41,
      reference: 'EV-2026-000041',
      state: 'delivered',
      useFrom: addDays(today, -6),
      useTo: addDays(today, -1),
    });
    expect(arrivalsSummary([past], today)).toBeNull();
    const page = Array.from({ length: 3 }, (_, i) =>
      outboxMessage({ id: i + 1, subject: `S${i}` }),
    );
    expect(outboxSummary(page, 3)!.headline).toBe('3+ e-mails could not be delivered');
    expect(outboxSummary([], 3)).toBeNull();
  });
});

describe('greetingFor', () => {
  it('splits the day at 5:00, 12:00 and 18:00 (common practice for greetings)', () => {
    expect([4, 5, 11, 12, 17, 18, 23].map(greetingFor)).toEqual([
      'Good evening',
      'Good morning',
      'Good morning',
      'Good afternoon',
      'Good afternoon',
      'Good evening',
      'Good evening',
    ]);
  });
});

describe('next steps from visits and returns', () => {
  const today = '2027-03-01';

  it('puts a hospital’s unfilled visits first, then those waiting, then booked ones', () => {
    const summary = buyerVisitsSummary(
      [
        visit({ id: 1, state: 'accepted', proctorName: 'Dr Example' }),
        visit({ id: 2, state: 'unfilled', reference: 'PV-2027-000002' }),
        visit({ id: 3, state: 'signed_off' }),
        visit({
          id: 4,
          currentOffer: {
            id: 9,
            proctorId: 101,
            proctorName: 'Dr Waiting',
            position: 1,
            state: 'offered',
            score: 0.8,
            offeredAt: '2027-02-27T09:00:00Z',
            deadlineAt: '2027-03-01T09:00:00Z',
            answeredAt: null,
            reason: null,
          },
        }),
      ],
      today,
    );
    expect(summary?.headline).toBe('3 visits under way · 1 needs you');
    expect(summary?.items.map((i) => [i.text, i.tone])).toEqual([
      ['No proctor found for PV-2027-000002', 'action'],
      ['Waiting for Dr Waiting to answer', 'waiting'],
      ['Dr Example comes to North Campus', 'info'],
    ]);
    expect(buyerVisitsSummary([visit({ state: 'cancelled' })], today)).toBeNull();
  });

  it('shows a proctor only the offers they hold, and their visits still to come', () => {
    const held = (id: number, proctorId: number) =>
      visit({
        id,
        currentOffer: {
          id,
          proctorId,
          proctorName: 'P',
          position: 1,
          state: 'offered',
          score: null,
          offeredAt: null,
          deadlineAt: '2027-03-02T09:00:00Z',
          answeredAt: null,
          reason: null,
        },
      });
    const summary = proctorOffersSummary(
      [held(1, 101), held(2, 202), visit({ id: 3, state: 'accepted', proctorId: 101 })],
      101,
      today,
    );
    expect(summary?.headline).toBe('1 offer waiting for your answer');
    expect(summary?.items.map((i) => i.link)).toEqual(['/proctor', '/visits/3']);
    expect(proctorOffersSummary([held(2, 202)], 101, today)).toBeNull();
  });

  it('asks a coordinator to inspect received returns before those on the way', () => {
    const summary = returnsSummary([
      returnLeg(1, 'in_transit'),
      returnLeg(2, 'received'),
      returnLeg(3, 'inspected'),
    ]);
    expect(summary?.headline).toBe('1 return to inspect');
    expect(summary?.items.map((i) => i.text)).toEqual([
      'Inspect EV-2027-000002',
      'EV-2027-000001 on its way back',
    ]);
    expect(returnsSummary([returnLeg(3, 'inspected')])).toBeNull();
  });
});
