import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { membership, organisations, person } from '../../testing/people';
import { VisitSettings } from './visit-settings';

async function open(role: 'fleet_manager' | 'buyer') {
  TestBed.configureTestingModule({
    providers: [
      provideHttpClient(withInterceptors([errorInterceptor])),
      provideHttpClientTesting(),
      provideRouter([]),
    ],
  });
  TestBed.inject(SessionStore).setUser(
    person([membership(role === 'buyer' ? 'velmora' : 'dralvik', role)]),
  );
  const fixture = TestBed.createComponent(VisitSettings);
  const http = TestBed.inject(HttpTestingController);
  fixture.detectChanges();
  return { fixture, http, loader: TestbedHarnessEnvironment.loader(fixture) };
}

describe('VisitSettings', () => {
  it('a hospital buyer: refuses a threshold outside 1–10 before sending, then saves 2', async () => {
    const { fixture, http, loader } = await open('buyer');
    http
      .expectOne(`/api/visits/settings/hospitals/${organisations.velmora.id}`)
      .flush({ hospitalId: organisations.velmora.id, name: 'Velmora Health', signOffThreshold: 3 });
    await fixture.whenStable();
    const input = await loader.getHarness(MatInputHarness);
    expect(await input.getValue()).toBe('3');
    const save = await loader.getHarness(MatButtonHarness.with({ text: 'Save threshold' }));

    for (const bad of ['11', '0', '2.5', 'three']) {
      await input.setValue(bad);
      await save.click();
      http.expectNone(`/api/visits/settings/hospitals/${organisations.velmora.id}`);
      expect(fixture.nativeElement.textContent).toMatch(
        /Enter the sign-off threshold (from 1 to 10|as a whole number)\./,
      );
    }
    await input.setValue('2');
    await save.click();
    const req = http.expectOne(`/api/visits/settings/hospitals/${organisations.velmora.id}`);
    expect(req.request.method).toBe('PUT');
    expect(req.request.body).toEqual({ signOffThreshold: 2 });
    req.flush({
      hospitalId: organisations.velmora.id,
      name: 'Velmora Health',
      signOffThreshold: 2,
    });
    await fixture.whenStable();
    expect(fixture.nativeElement.textContent).toContain(
      'Sign-off after 2 cases performed under supervision.',
    );
    http.verify();
  });

  it('a fleet manager: per model, an empty field returns to the default; server errors show', async () => {
    const { fixture, http, loader } = await open('fleet_manager');
    const settings = (own: number | null) => ({
      lenderId: organisations.dralvik.id,
      lenderDefault: 20,
      models: [{ modelId: 5, name: 'Model R2', minSupervisedCases: own, effective: own ?? 20 }],
    });
    http.expectOne(`/api/visits/settings/lenders/${organisations.dralvik.id}`).flush(settings(12));
    await fixture.whenStable();
    const input = await loader.getHarness(MatInputHarness);
    expect(await input.getValue()).toBe('12');
    const save = await loader.getHarness(MatButtonHarness.with({ text: 'Save' }));

    await input.setValue('-3');
    await save.click();
    http.expectNone('/api/visits/settings/models/5');

    await input.setValue('');
    await save.click();
    const reset = http.expectOne('/api/visits/settings/models/5');
    expect(reset.request.body).toEqual({ minSupervisedCases: null });
    reset.flush(settings(null));
    await fixture.whenStable();
    expect(fixture.nativeElement.textContent).toContain('Model R2: back to the default (20).');

    // The server's field message is shown on the field (e.g. a rule tightened since loading).
    await (await loader.getHarness(MatInputHarness)).setValue('40');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save' }))).click();
    http.expectOne('/api/visits/settings/models/5').flush(
      {
        error: {
          code: 'validation_failed',
          message: 'Check the highlighted field.',
          details: {
            fieldErrors: {
              minSupervisedCases: ['Enter the minimum supervised cases from 0 to 30.'],
            },
            formErrors: [],
          },
        },
      },
      { status: 422, statusText: 'Unprocessable Entity' },
    );
    await fixture.whenStable();
    expect(fixture.nativeElement.textContent).toContain(
      'Enter the minimum supervised cases from 0 to 30.',
    );
    http.verify();
  });
});
