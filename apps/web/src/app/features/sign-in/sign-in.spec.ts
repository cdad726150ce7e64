import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { Router, provideRouter } from '@angular/router';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { membership, person } from '../../testing/people';
import { SignIn } from './sign-in';

describe('SignIn', () => {
  let fixture: ComponentFixture<SignIn>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
      ],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(SignIn);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  const field = (label: string) =>
    loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
  const input = async (label: string) => (await field(label)).getControl(MatInputHarness);
  const submit = () => loader.getHarness(MatButtonHarness.with({ text: 'Sign in' }));
  const alertText = () =>
    fixture.nativeElement.querySelector('[role="alert"] span')?.textContent?.trim() ?? null;

  async function signInWith(email: string, password: string): Promise<void> {
    await (await input('E-mail address'))?.setValue(email);
    await (await input('Password'))?.setValue(password);
    await (await submit()).click();
  }

  /** Lets the submit handler's promise chain finish and the view update. */
  async function settle(): Promise<void> {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  }

  async function answerLogin(status: number, body: unknown, headers: Record<string, string> = {}) {
    const request = http.expectOne('/api/auth/login');
    request.flush(body, { status, statusText: String(status), headers });
    await settle();
  }

  it('explains what is missing when submitted empty, and sends nothing', async () => {
    await (await submit()).click();
    expect(await (await field('E-mail address')).getTextErrors()).toEqual([
      'Enter your e-mail address.',
    ]);
    expect(await (await field('Password')).getTextErrors()).toEqual(['Enter your password.']);
    http.expectNone('/api/auth/login');
  });

  it('asks for a proper e-mail address', async () => {
    await signInWith('dana.whitlock', 'evalon-demo');
    expect(await (await field('E-mail address')).getTextErrors()).toEqual([
      'Enter an e-mail address like name@hospital.example.',
    ]);
    http.expectNone('/api/auth/login');
  });

  it('signs in, stores the person and goes to the return address', async () => {
    const navigate = jest.spyOn(TestBed.inject(Router), 'navigateByUrl').mockResolvedValue(true);
    fixture.componentRef.setInput('returnUrl', '/loans');
    await signInWith('dana.whitlock@velmora.example', 'evalon-demo');
    const request = http.expectOne('/api/auth/login');
    expect(request.request.body).toEqual({
      email: 'dana.whitlock@velmora.example',
      password: 'evalon-demo',
    });
    request.flush({ user: person([membership('velmora', 'buyer')]) });
    await settle();
    expect(TestBed.inject(SessionStore).user()?.name).toBe('Dana Whitlock');
    expect(navigate).toHaveBeenCalledWith('/loans');
  });

  it('never follows a return address to another site', async () => {
    const navigate = jest.spyOn(TestBed.inject(Router), 'navigateByUrl').mockResolvedValue(true);
    fixture.componentRef.setInput('returnUrl', '//elsewhere.example/phish');
    await signInWith('dana.whitlock@velmora.example', 'evalon-demo');
    await answerLogin(200, { user: person([membership('velmora', 'buyer')]) });
    expect(navigate).toHaveBeenCalledWith('/');
  });

  it('says the e-mail and password do not match on 401 invalid_credentials, and clears the password', async () => {
    await signInWith('dana.whitlock@velmora.example', 'wrong-password');
    await answerLogin(401, {
      error: { code: 'invalid_credentials', message: 'Invalid credentials' },
    });
    expect(alertText()).toBe(
      'That e-mail address and password don’t match. Check both and try again.',
    );
    expect(await (await input('Password'))?.getValue()).toBe('');
    expect(TestBed.inject(SessionStore).signedIn()).toBe(false);
  });

  it('says the account is deactivated on 401 account_deactivated', async () => {
    await signInWith('former.member@velmora.example', 'evalon-demo');
    await answerLogin(401, { error: { code: 'account_deactivated', message: 'Deactivated' } });
    expect(alertText()).toMatch(/^This account has been deactivated\./);
  });

  it('tells how long to wait on 429, from Retry-After', async () => {
    await signInWith('dana.whitlock@velmora.example', 'evalon-demo');
    await answerLogin(
      429,
      { error: { code: 'rate_limited', message: 'Too many requests' } },
      { 'Retry-After': '300' },
    );
    expect(alertText()).toBe('Too many sign-in attempts. Try again in 5 minutes.');
  });

  it("tells how long to wait on the server's 429 too_many_attempts, from Retry-After", async () => {
    await signInWith('dana.whitlock@velmora.example', 'evalon-demo');
    await answerLogin(
      429,
      { error: { code: 'too_many_attempts', message: 'Too many sign-in attempts.' } },
      { 'Retry-After': '900' },
    );
    expect(alertText()).toBe('Too many sign-in attempts. Try again in 15 minutes.');
  });

  it('explains a deactivated account after Google sign-in', async () => {
    fixture.componentRef.setInput('error', 'account_deactivated');
    await fixture.whenStable();
    expect(alertText()).toMatch(/^This account has been deactivated\./);
  });

  it('explains a Google account that is not linked to anyone', async () => {
    fixture.componentRef.setInput('error', 'google_unknown');
    await fixture.whenStable();
    expect(alertText()).toMatch(/^That Google account isn’t linked to anyone in Evalon yet\./);
  });

  it('offers Google sign-in as a full-page link to the server', async () => {
    const google = await loader.getHarness(MatButtonHarness.with({ text: /Continue with Google/ }));
    expect(await (await google.host()).getAttribute('href')).toBe('/api/auth/google');
  });
});
