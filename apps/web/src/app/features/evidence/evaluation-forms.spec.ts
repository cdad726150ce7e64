import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatRadioGroupHarness } from '@angular/material/radio/testing';
import { feedbackItems } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { EvaluationDecisionForm } from './evaluation-decision';
import { EvaluationSurvey } from './evaluation-survey';

function setUp<T>(component: new (...args: never[]) => T) {
  TestBed.configureTestingModule({
    providers: [
      provideHttpClient(withInterceptors([errorInterceptor])),
      provideHttpClientTesting(),
      { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
    ],
  });
  const fixture = TestBed.createComponent(component);
  fixture.componentRef.setInput('loanId', 3);
  return {
    fixture,
    http: TestBed.inject(HttpTestingController),
    loader: TestbedHarnessEnvironment.loader(fixture) as HarnessLoader,
    text: () => ((fixture.nativeElement as HTMLElement).textContent ?? '').replace(/\s+/g, ' '),
  };
}

describe('EvaluationSurvey', () => {
  it('needs every statement rated, refuses identifiers in the comment, then sends', async () => {
    const { fixture, http, loader, text } = setUp(EvaluationSurvey);
    await fixture.whenStable();
    const send = async () =>
      (await loader.getHarness(MatButtonHarness.with({ text: 'Send my answers' }))).click();
    await send();
    expect(text()).toContain('Rate every statement from 1 to 5.');
    http.expectNone('/api/loans/3/feedback');

    const groups = await loader.getAllHarnesses(MatRadioGroupHarness);
    expect(groups).toHaveLength(feedbackItems.length);
    for (const [i, g] of groups.entries()) {
      await g.checkRadioButton({ label: String((i % 5) + 1) });
    }
    const comment = await loader.getHarness(MatInputHarness.with({ selector: 'textarea' }));
    await comment.setValue('Call me on 555-010-4477');
    await send();
    expect(text()).toContain('looks like a phone number');
    http.expectNone('/api/loans/3/feedback');

    await comment.setValue('Good view of the field');
    await send();
    const req = http.expectOne({ method: 'POST', url: '/api/loans/3/feedback' });
    expect(req.request.body).toEqual({
      ratings: {
        setup: 1,
        handling: 2,
        visualisation: 3,
        ergonomics: 4,
        reliability: 5,
        would_use_again: 1,
      },
      comment: 'Good view of the field',
    });
    req.flush({
      feedback: {
        clinicianId: 1,
        clinicianName: 'x',
        ratings: req.request.body.ratings,
        comment: null,
        updatedAt: '2026-12-04T10:00:00.000Z',
      },
    });
    http.verify();
  });
});

describe('EvaluationDecisionForm', () => {
  it('needs a decision and a reason, then sends them', async () => {
    const { fixture, http, loader, text } = setUp(EvaluationDecisionForm);
    await fixture.whenStable();
    const record = async () =>
      (await loader.getHarness(MatButtonHarness.with({ text: 'Record the decision' }))).click();
    await record();
    expect(text()).toContain('Choose buy, not now or no.');
    expect(text()).toContain('Give at least one reason.');
    http.expectNone('/api/loans/3/decision');

    await (await loader.getHarness(MatRadioGroupHarness)).checkRadioButton({ label: 'Not now' });
    await (await loader.getHarness(MatCheckboxHarness.with({ label: 'Budget timing' }))).check();
    await (await loader.getHarness(MatCheckboxHarness.with({ label: 'Total cost' }))).check();
    await record();
    const req = http.expectOne({ method: 'POST', url: '/api/loans/3/decision' });
    expect(req.request.body).toEqual({
      decision: 'not_now',
      reasons: ['budget_timing', 'total_cost'],
      note: null,
    });
    req.flush({
      decision: {
        decision: 'not_now',
        reasons: ['budget_timing', 'total_cost'],
        note: null,
        decidedByUserId: 1,
        decidedByName: 'Dana Whitcombe',
        decidedAt: '2026-12-04T10:00:00.000Z',
      },
    });
    http.verify();
  });
});
