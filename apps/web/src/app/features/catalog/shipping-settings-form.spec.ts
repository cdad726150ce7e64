import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter } from '@angular/router';
import type { ShippingSettings, ShippingSettingsResponse } from '@evalon/contracts';
import { shippingSettings as settingsContract } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { membership, person } from '../../testing/people';
import { lenderId } from './fleet-fixtures';
import { ShippingSettingsForm } from './shipping-settings-form';

const url = `/api/lenders/${lenderId}/shipping-settings`;

/**
 * Settings as a lender might keep them. The lead days follow the product brief's defaults (2,
 * and 3 for a first loan, after sample hospital loaner policies of 48 h / 72 h — policy text,
 * medium confidence per docs/references.md); the bands are an invented example.
 */
const stored: ShippingSettings = {
  distanceBands: [
    { maxKm: 300, days: 1 },
    { maxKm: 1000, days: 2 },
    { maxKm: null, days: 4 },
  ],
  customsDays: 2,
  leadDays: 2,
  firstLoanLeadDays: 3,
  decontaminationDays: 1,
  turnaroundDays: 2,
};

const response = (settings: ShippingSettings, isDefault: boolean): ShippingSettingsResponse => ({
  lenderId,
  settings,
  isDefault,
  updatedAt: isDefault ? null : '2027-01-05T10:00:00.000Z',
});

describe('ShippingSettingsForm', () => {
  let fixture: ComponentFixture<ShippingSettingsForm>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  async function settle(): Promise<void> {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  }

  beforeEach(async () => {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(person([membership('dralvik', 'fleet_manager')]));
    fixture = TestBed.createComponent(ShippingSettingsForm);
    fixture.componentRef.setInput('lenderId', lenderId);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    http.expectOne(url).flush(response(stored, true));
    await settle();
  });

  afterEach(() => http.verify());

  const input = (label: string) =>
    loader.getHarness(MatInputHarness.with({ selector: `[aria-label="${label}"]` }));
  const field = (label: string) =>
    loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
  const errorsOf = async (label: string) =>
    (
      await loader.getHarness(
        MatFormFieldHarness.with({ selector: `mat-form-field:has([aria-label="${label}"])` }),
      )
    ).getTextErrors();
  const save = async () =>
    (await loader.getHarness(MatButtonHarness.with({ text: /Save shipping settings/ }))).click();

  it('shows the bands as rows with an open last band and says the values are assumptions', async () => {
    expect(await (await input('Distance band 1: ends at, in km')).getValue()).toBe('300');
    expect(await (await input('Distance band 2: ends at, in km')).getValue()).toBe('1000');
    expect(await (await input('Distance band 2: transit business days')).getValue()).toBe('2');
    expect(await (await input('Any longer trip: transit business days')).getValue()).toBe('4');
    const rows = Array.from(
      fixture.nativeElement.querySelectorAll('.band-from') as NodeListOf<HTMLElement>,
    ).map((el) => el.textContent!.trim());
    expect(rows).toEqual(['From 0 km', 'Above 300 km', 'Above 1000 km']);
    const note = fixture.nativeElement.querySelector('.assumptions').textContent;
    expect(note).toContain('You are using Evalon’s starting values');
    expect(note).toContain('assumptions, not carrier commitments');
    expect(await (await field('Hospital lead days')).getControl(MatInputHarness)).toBeTruthy();
  });

  it('saves bounded bands followed by the open band, in a shape the contract accepts', async () => {
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add a distance band/ }))).click();
    await (await input('Distance band 3: ends at, in km')).setValue('2500');
    await (await input('Distance band 3: transit business days')).setValue('3');
    await (await input('Any longer trip: transit business days')).setValue('5');
    const customs = await (
      await field('Customs days per border crossing')
    ).getControl(MatInputHarness);
    await customs!.setValue('3');

    await save();
    const request = http.expectOne(url);
    expect(request.request.method).toBe('PUT');
    const body = request.request.body as ShippingSettings;
    expect(body).toEqual({
      distanceBands: [
        { maxKm: 300, days: 1 },
        { maxKm: 1000, days: 2 },
        { maxKm: 2500, days: 3 },
        { maxKm: null, days: 5 },
      ],
      customsDays: 3,
      leadDays: 2,
      firstLoanLeadDays: 3,
      decontaminationDays: 1,
      turnaroundDays: 2,
    });
    expect(settingsContract.safeParse(body).success).toBe(true);
    request.flush(response(body, false));
    await settle();
    expect(fixture.nativeElement.querySelector('.assumptions').textContent).toContain(
      'Your own values, saved',
    );
  });

  it('asks for bands that end further away each time, and for lead days of at least 1', async () => {
    await (await input('Distance band 2: ends at, in km')).setValue('200');
    const lead = await (await field('Hospital lead days')).getControl(MatInputHarness);
    await lead!.setValue('0');
    await save();
    await settle();
    expect(await errorsOf('Distance band 2: ends at, in km')).toEqual([
      'End this band further than 300 km, where the one before ends.',
    ]);
    expect(await (await field('Hospital lead days')).getTextErrors()).toEqual([
      'Enter a whole number from 1 to 30. A unit cannot arrive on the day of the case.',
    ]);
    http.expectNone(url);

    // Fixing the first band re-checks the second one.
    await (await input('Distance band 1: ends at, in km')).setValue('150');
    await lead!.setValue('2');
    await save();
    const request = http.expectOne(url);
    expect((request.request.body as ShippingSettings).distanceBands[1]).toEqual({
      maxKm: 200,
      days: 2,
    });
    request.flush(response(request.request.body, false));
  });

  it('removes a band and puts back the stored values on “Undo changes”', async () => {
    await (
      await loader.getHarness(
        MatButtonHarness.with({ selector: '[aria-label="Remove distance band 1"]' }),
      )
    ).click();
    expect(await (await input('Distance band 1: ends at, in km')).getValue()).toBe('1000');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Undo changes' }))).click();
    expect(await (await input('Distance band 1: ends at, in km')).getValue()).toBe('300');
    expect(await (await input('Distance band 2: ends at, in km')).getValue()).toBe('1000');
  });

  it('shows the server’s message for a band on that band', async () => {
    await save();
    http.expectOne(url).flush(
      {
        error: {
          code: 'validation_failed',
          message: 'Some fields need attention.',
          details: {
            fieldErrors: {
              'distanceBands.1.maxKm': ['Each band must end further away than the one before.'],
              'distanceBands.2.days': ['Too many days.'],
            },
            formErrors: [],
          },
        },
      },
      { status: 422, statusText: 'Unprocessable Entity' },
    );
    await settle();
    expect(await errorsOf('Distance band 2: ends at, in km')).toEqual([
      'Each band must end further away than the one before.',
    ]);
    expect(await errorsOf('Any longer trip: transit business days')).toEqual(['Too many days.']);
  });
});
