import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient } from '@angular/common/http';
import {
  HttpTestingController,
  TestRequest,
  provideHttpClientTesting,
} from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatBadgeHarness } from '@angular/material/badge/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatMenuHarness } from '@angular/material/menu/testing';
import { Router, provideRouter } from '@angular/router';
import type { Notification } from '@evalon/contracts';
import { notification } from '../../testing/payments';
import { membership, person } from '../../testing/people';
import { SessionStore } from '../session-store';
import { NOTIFICATION_POLL_MS, NotificationBell } from './notification-bell';

const confirmed = notification({ id: 3, title: 'Loan EV-2026-000001 confirmed' });
const approved = notification({
  id: 2,
  kind: 'loan.approved',
  title: 'Loan EV-2026-000002 approved',
  body: 'Secure the deposit before the deadline.',
  link: '/loans/2',
  createdAt: '2026-12-01T09:00:00.000Z',
});
const old = notification({
  id: 1,
  kind: 'loan.requested',
  title: 'Loan EV-2026-000003 requested',
  link: '/loans/3',
  createdAt: '2026-11-20T09:00:00.000Z',
  readAt: '2026-11-20T10:00:00.000Z',
});

describe('NotificationBell', () => {
  let fixture: ComponentFixture<NotificationBell>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  const settle = async (ms = 0) => {
    await new Promise((resolve) => setTimeout(resolve, ms));
    await fixture.whenStable();
  };

  /** Requests for the bell's list still waiting for an answer (cancelled ones dropped). */
  const polls = (): TestRequest[] =>
    http
      .match((r) => r.url === '/api/notifications' && r.method === 'GET')
      .filter((r) => !r.cancelled);

  async function render(pollMs = 3_600_000): Promise<void> {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([{ path: '**', children: [] }]),
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
        { provide: NOTIFICATION_POLL_MS, useValue: pollMs },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(person([membership('dralvik', 'coordinator')]));
    fixture = TestBed.createComponent(NotificationBell);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
  }

  async function answer(items: Notification[], unreadCount: number): Promise<void> {
    await settle(); // The first poll starts on a zero-delay timer.
    const pending = polls();
    expect(pending).toHaveLength(1);
    expect(pending[0]!.request.params.get('limit')).toBe('5');
    pending[0]!.flush({ items, unreadCount });
    await settle();
  }

  afterEach(() => {
    http.verify({ ignoreCancelled: true });
    Object.defineProperty(document, 'visibilityState', { value: 'visible', configurable: true });
  });

  it('shows the unread count on the badge and in the button’s name', async () => {
    await render();
    await answer([confirmed, approved, old], 2);
    const badge = await loader.getHarness(MatBadgeHarness);
    expect(await badge.getText()).toBe('2');
    expect(await badge.isHidden()).toBe(false);
    expect(fixture.nativeElement.querySelector('button').getAttribute('aria-label')).toBe(
      'Notifications, 2 unread',
    );
  });

  it('hides the badge at zero and writes 99+ above 99', async () => {
    await render();
    await answer([old], 0);
    expect(await (await loader.getHarness(MatBadgeHarness)).isHidden()).toBe(true);
    expect(fixture.nativeElement.querySelector('button').getAttribute('aria-label')).toBe(
      'Notifications',
    );
    TestBed.inject(Router).navigateByUrl('/loans');
    await settle();
    await answer([confirmed], 140);
    expect(await (await loader.getHarness(MatBadgeHarness)).getText()).toBe('99+');
  });

  it('lists the latest in the menu and marks all read', async () => {
    await render();
    await answer([confirmed, approved, old], 2);
    const menu = await loader.getHarness(MatMenuHarness);
    await menu.open();
    const items = await menu.getItems();
    const texts = await Promise.all(items.map((i) => i.getText()));
    expect(texts.slice(0, 3).map((t) => t.split(/\s{2,}|\n/)[0])).toEqual([
      expect.stringContaining('Loan EV-2026-000001 confirmed'),
      expect.stringContaining('Loan EV-2026-000002 approved'),
      expect.stringContaining('Loan EV-2026-000003 requested'),
    ]);
    expect(texts[0]).toContain('unread');
    expect(texts[2]).not.toContain('unread');
    expect(texts.slice(3)).toEqual([
      expect.stringContaining('Mark all as read'),
      expect.stringContaining('See all notifications'),
    ]);

    await items[3]!.click();
    const readAll = http.expectOne('/api/notifications/read-all');
    expect(readAll.request.method).toBe('POST');
    readAll.flush({ updated: 2, unreadCount: 0 });
    await settle();
    expect(await (await loader.getHarness(MatBadgeHarness)).isHidden()).toBe(true);
  });

  it('opens a notification’s loan and marks it read', async () => {
    await render();
    await answer([confirmed, approved], 2);
    const navigate = jest.spyOn(TestBed.inject(Router), 'navigateByUrl');
    const menu = await loader.getHarness(MatMenuHarness);
    await menu.open();
    await (await menu.getItems())[1]!.click();
    expect(navigate).toHaveBeenCalledWith('/loans/2');
    http
      .expectOne('/api/notifications/2/read')
      .flush({ notification: { ...approved, readAt: '2026-12-02T12:00:00.000Z' }, unreadCount: 1 });
    await settle();
    // The navigation also refreshes the bell.
    await answer([confirmed, { ...approved, readAt: '2026-12-02T12:00:00.000Z' }], 1);
    expect(await (await loader.getHarness(MatBadgeHarness)).getText()).toBe('1');
  });

  it('asks again on its interval while the tab is visible, and not while it is hidden', async () => {
    await render(40);
    await answer([], 0);
    await settle(60);
    // Under load several intervals may pass; each new poll replaces the one before.
    await answer([confirmed], 1);

    Object.defineProperty(document, 'visibilityState', { value: 'hidden', configurable: true });
    document.dispatchEvent(new Event('visibilitychange'));
    // A poll already on its way when the tab hid still gets its answer; nothing new is asked.
    for (const late of polls()) late.flush({ items: [confirmed], unreadCount: 1 });
    await settle(120);
    expect(polls()).toHaveLength(0);

    // Back in view: at once, without waiting for the interval.
    Object.defineProperty(document, 'visibilityState', { value: 'visible', configurable: true });
    document.dispatchEvent(new Event('visibilitychange'));
    await settle();
    await answer([confirmed, approved], 2);
    fixture.destroy();
  });
});
