import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { Router, provideRouter } from '@angular/router';
import type { Notification } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { NotificationInbox } from '../../core/shell/notification-inbox';
import { notification } from '../../testing/payments';
import { membership, person } from '../../testing/people';
import { NOTIFICATION_PAGE_SIZE, NotificationList } from './notification-list';

const confirmed = notification({ id: 3, title: 'Loan EV-2026-000001 confirmed' });
const approved = notification({
  id: 2,
  kind: 'loan.approved',
  title: 'Loan EV-2026-000002 approved',
  link: '/loans/2',
  readAt: '2026-12-01T10:00:00.000Z',
});

describe('NotificationList', () => {
  let fixture: ComponentFixture<NotificationList>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  };
  const titles = () =>
    Array.from(
      fixture.nativeElement.querySelectorAll('.list .title') as NodeListOf<HTMLElement>,
    ).map((e) => e.textContent!.trim());

  async function open(items: Notification[], unreadCount: number): Promise<void> {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([{ path: '**', children: [] }]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(person([membership('dralvik', 'coordinator')]));
    fixture = TestBed.createComponent(NotificationList);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    http
      .expectOne(`/api/notifications?limit=${NOTIFICATION_PAGE_SIZE}`)
      .flush({ items, unreadCount });
    await settle();
  }

  afterEach(() => http.verify());

  it('lists all notifications, unread ones marked for screen readers too', async () => {
    await open([confirmed, approved], 1);
    expect(titles()).toEqual([
      'Unread: Loan EV-2026-000001 confirmed',
      'Loan EV-2026-000002 approved',
    ]);
    expect(fixture.nativeElement.querySelectorAll('li.unread')).toHaveLength(1);
  });

  it('marks a notification read when it is opened, and goes to its loan', async () => {
    await open([confirmed, approved], 1);
    const navigate = jest.spyOn(TestBed.inject(Router), 'navigateByUrl');
    await (await loader.getAllHarnesses(MatButtonHarness.with({ text: /Open/ })))[0]!.click();
    expect(navigate).toHaveBeenCalledWith('/loans/1');
    const read = http.expectOne('/api/notifications/3/read');
    expect(read.request.method).toBe('POST');
    read.flush({
      notification: { ...confirmed, readAt: '2026-12-02T16:00:00.000Z' },
      unreadCount: 0,
    });
    await settle();
    expect(fixture.nativeElement.querySelectorAll('li.unread')).toHaveLength(0);
    expect(TestBed.inject(NotificationInbox).unreadCount()).toBe(0);
  });

  it('opens a read notification without marking it again', async () => {
    await open([confirmed, approved], 1);
    const navigate = jest.spyOn(TestBed.inject(Router), 'navigateByUrl');
    await (await loader.getAllHarnesses(MatButtonHarness.with({ text: /Open/ })))[1]!.click();
    expect(navigate).toHaveBeenCalledWith('/loans/2');
    http.expectNone('/api/notifications/2/read');
  });

  it('marks all read', async () => {
    await open([confirmed, approved], 1);
    const markAll = await loader.getHarness(MatButtonHarness.with({ text: /Mark all as read/ }));
    expect(await markAll.isDisabled()).toBe(false);
    await markAll.click();
    http.expectOne('/api/notifications/read-all').flush({ updated: 1, unreadCount: 0 });
    await settle();
    expect(fixture.nativeElement.querySelectorAll('li.unread')).toHaveLength(0);
    expect(await markAll.isDisabled()).toBe(true);
  });

  it('switches to unread only, with an empty state and a way back', async () => {
    await open([confirmed, approved], 1);
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: /Unread/ }))).check();
    http
      .expectOne(`/api/notifications?limit=${NOTIFICATION_PAGE_SIZE}&unread=true`)
      .flush({ items: [], unreadCount: 0 });
    await settle();
    expect(fixture.nativeElement.textContent).toContain('Nothing unread');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Show all' }))).click();
    http
      .expectOne(`/api/notifications?limit=${NOTIFICATION_PAGE_SIZE}`)
      .flush({ items: [approved], unreadCount: 0 });
    await settle();
    expect(titles()).toEqual(['Loan EV-2026-000002 approved']);
  });

  it('says when there is nothing at all yet', async () => {
    await open([], 0);
    expect(fixture.nativeElement.textContent).toContain('No notifications yet');
  });

  it('pages back to older notifications', async () => {
    const page = Array.from({ length: NOTIFICATION_PAGE_SIZE }, (_, i) =>
      notification({ id: 100 - i, title: `Loan ${100 - i}`, readAt: '2026-12-01T00:00:00.000Z' }),
    );
    await open(page, 0);
    await (
      await loader.getHarness(MatButtonHarness.with({ text: 'Show older notifications' }))
    ).click();
    http.expectOne(`/api/notifications?limit=${NOTIFICATION_PAGE_SIZE}&before=81`).flush({
      items: [notification({ id: 80, title: 'Loan 80', readAt: '2026-12-01T00:00:00.000Z' })],
      unreadCount: 0,
    });
    await settle();
    expect(titles().at(-1)).toBe('Loan 80');
    expect(
      await loader.getAllHarnesses(MatButtonHarness.with({ text: 'Show older notifications' })),
    ).toHaveLength(0);
  });
});
