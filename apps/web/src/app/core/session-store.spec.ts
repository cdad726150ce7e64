import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { membership, organisations, person } from '../testing/people';
import { errorInterceptor } from './interceptors';
import { ACTIVE_ORGANISATION_KEY, SessionStore } from './session-store';

describe('SessionStore', () => {
  let http: HttpTestingController;

  function setUp(): SessionStore {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
      ],
    });
    http = TestBed.inject(HttpTestingController);
    return TestBed.inject(SessionStore);
  }

  beforeEach(() => localStorage.clear());
  afterEach(() => http.verify());

  it('lists each organisation once and takes the roles of the active one', () => {
    const session = setUp();
    session.setUser(
      person([
        membership('velmora', 'buyer'),
        membership('velmora', 'clinician'),
        membership('dralvik', 'coordinator'),
      ]),
    );
    expect(session.organisations().map((o) => o.name)).toEqual([
      organisations.velmora.name,
      organisations.dralvik.name,
    ]);
    expect(session.activeOrganisation()?.id).toBe(organisations.velmora.id);
    expect(session.roles()).toEqual(['buyer', 'clinician']);
    expect(session.canManageMembers()).toBe(true);

    session.selectOrganisation(organisations.dralvik.id);
    expect(session.roles()).toEqual(['coordinator']);
    expect(session.canManageMembers()).toBe(false);
  });

  it('remembers the chosen organisation in localStorage for the next visit', () => {
    let session = setUp();
    session.setUser(person([membership('velmora', 'buyer'), membership('zelvara', 'buyer')]));
    session.selectOrganisation(organisations.zelvara.id);
    expect(localStorage.getItem(ACTIVE_ORGANISATION_KEY)).toBe(String(organisations.zelvara.id));

    TestBed.resetTestingModule();
    session = setUp();
    session.setUser(person([membership('velmora', 'buyer'), membership('zelvara', 'buyer')]));
    expect(session.activeOrganisation()?.name).toBe(organisations.zelvara.name);
  });

  it('ignores a remembered organisation the person no longer belongs to', () => {
    localStorage.setItem(ACTIVE_ORGANISATION_KEY, '999');
    const session = setUp();
    session.setUser(person([membership('dralvik', 'fleet_manager')]));
    expect(session.activeOrganisation()?.id).toBe(organisations.dralvik.id);
  });

  it('loads /api/auth/me once for concurrent callers', async () => {
    const session = setUp();
    const first = session.ensureLoaded();
    const second = session.ensureLoaded();
    http.expectOne('/api/auth/me').flush({ user: person([membership('velmora', 'buyer')]) });
    expect((await first)?.name).toBe('Dana Whitlock');
    expect(await second).toBe(await first);
    await session.ensureLoaded(); // Answered from memory: no second request (verify() checks).
    expect(session.signedIn()).toBe(true);
  });

  it('treats 401 from /me as signed out and remembers that', async () => {
    const session = setUp();
    const loading = session.ensureLoaded();
    http
      .expectOne('/api/auth/me')
      .flush(
        { error: { code: 'unauthenticated', message: 'Sign in' } },
        { status: 401, statusText: 'Unauthorized' },
      );
    expect(await loading).toBeNull();
    expect(await session.ensureLoaded()).toBeNull();
    expect(session.signedIn()).toBe(false);
  });

  it('asks again after a server failure instead of deciding the person is signed out', async () => {
    const session = setUp();
    const loading = session.ensureLoaded();
    http.expectOne('/api/auth/me').flush('down', { status: 503, statusText: 'Unavailable' });
    expect(await loading).toBeNull();
    const retry = session.ensureLoaded();
    http.expectOne('/api/auth/me').flush({ user: person([membership('velmora', 'buyer')]) });
    expect(await retry).not.toBeNull();
  });
});
