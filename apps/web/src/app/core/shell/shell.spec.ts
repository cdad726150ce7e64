import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatMenuHarness } from '@angular/material/menu/testing';
import { Router, provideRouter } from '@angular/router';
import type { Membership } from '@evalon/contracts';
import { membership, organisations, person } from '../../testing/people';
import { SessionStore } from '../session-store';
import { Shell } from './shell';

describe('Shell', () => {
  let fixture: ComponentFixture<Shell>;
  let loader: HarnessLoader;
  let session: SessionStore;

  async function render(memberships: Membership[]): Promise<void> {
    localStorage.clear();
    TestBed.configureTestingModule({
      providers: [
        provideRouter([{ path: '**', children: [] }]),
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    session = TestBed.inject(SessionStore);
    session.setUser(person(memberships));
    fixture = TestBed.createComponent(Shell);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    // The notification bell asks for news as the shell appears (its own spec covers it).
    await new Promise((resolve) => setTimeout(resolve));
    for (const poll of TestBed.inject(HttpTestingController).match('/api/notifications?limit=5')) {
      if (!poll.cancelled) poll.flush({ items: [], unreadCount: 0 });
    }
  }

  /** Labels of the side navigation links (each link's text is "<icon ligature> <label>"). */
  async function navLabels(): Promise<string[]> {
    const links = await loader
      .getChildLoader('nav')
      .then((nav) => nav.getAllHarnesses(MatButtonHarness));
    const texts = await Promise.all(links.map((link) => link.getText()));
    return texts.map((text) => text.replace(/^[a-z0-9_]+\s+/, ''));
  }

  it('shows a buyer their pages and Members', async () => {
    await render([membership('velmora', 'buyer')]);
    expect(await navLabels()).toEqual([
      'Home',
      'Find equipment',
      'Loans',
      'Proctoring',
      'Visit settings',
      'Members',
    ]);
  });

  it('shows a coordinator Home, Shipments and (read-only) Units, without Members', async () => {
    await render([membership('dralvik', 'coordinator')]);
    expect(await navLabels()).toEqual(['Home', 'Shipments', 'Units']);
  });

  it('has no organisation switcher with a single organisation, just its name', async () => {
    await render([membership('velmora', 'buyer'), membership('velmora', 'clinician')]);
    const switchers = await loader.getAllHarnesses(
      MatButtonHarness.with({ selector: '.organisation-switcher' }),
    );
    expect(switchers).toHaveLength(0);
    expect(fixture.nativeElement.querySelector('.organisation-single')?.textContent).toContain(
      organisations.velmora.name,
    );
  });

  it('switches organisation from the menu and rebuilds the navigation for the new roles', async () => {
    await render([membership('velmora', 'buyer'), membership('dralvik', 'fleet_manager')]);
    const router = TestBed.inject(Router);
    const navigate = jest.spyOn(router, 'navigateByUrl');

    const switcher = await loader.getHarness(
      MatMenuHarness.with({ selector: '.organisation-switcher' }),
    );
    expect(await switcher.getTriggerText()).toContain(organisations.velmora.name);
    await switcher.open();
    const items = await switcher.getItems();
    expect(await Promise.all(items.map((i) => i.getText()))).toEqual([
      expect.stringContaining(organisations.velmora.name),
      expect.stringContaining(organisations.dralvik.name),
    ]);
    await items[1].click();

    expect(session.activeOrganisation()?.id).toBe(organisations.dralvik.id);
    expect(navigate).toHaveBeenCalledWith('/');
    expect(await navLabels()).toEqual([
      'Home',
      'Shipments',
      'Catalog',
      'Approvals',
      'Credit agreements',
      'Units',
      'Visit settings',
      'Members',
    ]);
  });

  it('has the notification bell in the top bar', async () => {
    await render([membership('dralvik', 'coordinator')]);
    const bell = fixture.nativeElement.querySelector('.top-bar ev-notification-bell button');
    expect(bell?.getAttribute('aria-label')).toBe('Notifications');
  });

  it('signs out from the person menu', async () => {
    await render([membership('velmora', 'clinician')]);
    const http = TestBed.inject(HttpTestingController);
    const navigate = jest.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);

    const menu = await loader.getHarness(MatMenuHarness.with({ selector: '.user-button' }));
    await menu.clickItem({ text: /Sign out/ });
    http.expectOne('/api/auth/logout').flush(null, { status: 204, statusText: 'No Content' });
    await new Promise((resolve) => setTimeout(resolve)); // Let sign-out's promise chain finish.
    await fixture.whenStable();

    expect(session.signedIn()).toBe(false);
    expect(navigate).toHaveBeenCalledWith(['/sign-in'], { queryParams: { reason: 'signed-out' } });
    http.verify({ ignoreCancelled: true });
  });
});
