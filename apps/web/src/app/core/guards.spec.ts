import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ChangeDetectionStrategy, Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import { membership, person } from '../testing/people';
import { roleGuard, signedIn, signedOut } from './guards';
import { errorInterceptor } from './interceptors';

@Component({ template: 'page', changeDetection: ChangeDetectionStrategy.OnPush })
class Page {}

describe('guards', () => {
  let http: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        provideRouter([
          { path: 'sign-in', canActivate: [signedOut], component: Page },
          {
            path: '',
            canActivate: [signedIn],
            children: [
              { path: '', component: Page },
              { path: 'loans', component: Page },
              { path: 'approvals', canActivate: [roleGuard('fleet_manager')], component: Page },
            ],
          },
        ]),
      ],
    });
    http = TestBed.inject(HttpTestingController);
  });

  afterEach(() => http.verify());

  /** Answers the session request once the navigation (which starts asynchronously) made it. */
  async function answerMe(user: ReturnType<typeof person> | null): Promise<void> {
    await new Promise((resolve) => setTimeout(resolve));
    const request = http.expectOne('/api/auth/me');
    if (user) request.flush({ user });
    else
      request.flush(
        { error: { code: 'unauthenticated', message: 'Not signed in.' } },
        { status: 401, statusText: 'Unauthorized' },
      );
  }

  it('sends signed-out people to sign-in with the page they wanted', async () => {
    const harness = await RouterTestingHarness.create();
    const navigation = harness.navigateByUrl('/loans?status=open');
    await answerMe(null);
    await navigation;
    const router = TestBed.inject(Router);
    expect(router.url).toBe('/sign-in?returnUrl=%2Floans%3Fstatus%3Dopen');
  });

  it('does not add a return address for the home page', async () => {
    const harness = await RouterTestingHarness.create();
    const navigation = harness.navigateByUrl('/');
    await answerMe(null);
    await navigation;
    expect(TestBed.inject(Router).url).toBe('/sign-in');
  });

  it('lets signed-in people through, and keeps them off the sign-in page', async () => {
    const harness = await RouterTestingHarness.create();
    const navigation = harness.navigateByUrl('/loans');
    await answerMe(person([membership('velmora', 'buyer')]));
    await navigation;
    expect(TestBed.inject(Router).url).toBe('/loans');

    await harness.navigateByUrl('/sign-in');
    expect(TestBed.inject(Router).url).toBe('/');
  });

  it('sends people without the role home', async () => {
    const harness = await RouterTestingHarness.create();
    const navigation = harness.navigateByUrl('/approvals');
    await answerMe(person([membership('velmora', 'buyer')]));
    await navigation;
    expect(TestBed.inject(Router).url).toBe('/');
  });

  it('lets people with the role in the active organisation through', async () => {
    const harness = await RouterTestingHarness.create();
    const navigation = harness.navigateByUrl('/approvals');
    await answerMe(person([membership('dralvik', 'fleet_manager')]));
    await navigation;
    expect(TestBed.inject(Router).url).toBe('/approvals');
  });
});
