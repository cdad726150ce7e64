import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatDialog } from '@angular/material/dialog';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { provideRouter } from '@angular/router';
import { depotInput } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { DepotDialog, DepotDialogData, timeZoneOptions } from './depot-dialog';
import { fleetDepots, lenderId } from './fleet-fixtures';

@Component({ template: '', changeDetection: ChangeDetectionStrategy.OnPush })
class Opener {
  readonly dialog = inject(MatDialog);
}

describe('DepotDialog', () => {
  let fixture: ComponentFixture<Opener>;
  let root: HarnessLoader;
  let http: HttpTestingController;

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
    fixture = TestBed.createComponent(Opener);
    root = TestbedHarnessEnvironment.documentRootLoader(fixture);
  });

  afterEach(() => http.verify());

  const control = async (dialog: MatDialogHarness, label: string) =>
    (await dialog.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }))).getControl();

  it('offers the browser’s IANA time zones', () => {
    const zones = timeZoneOptions();
    expect(zones).toEqual(Intl.supportedValuesOf('timeZone'));
    expect(zones).toEqual(expect.arrayContaining(['America/New_York', 'Europe/Berlin']));
  });

  it('adds a depot with the values normalised the way the contract reads them', async () => {
    fixture.componentInstance.dialog.open<DepotDialog, DepotDialogData>(DepotDialog, {
      data: { lenderId },
    });
    const dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Add a depot');
    await ((await control(dialog, 'Depot name')) as MatInputHarness).setValue(
      ' Dralvik Lake Depot ',
    );
    await ((await control(dialog, 'Street address')) as MatInputHarness).setValue('9 Shore Road');
    await ((await control(dialog, 'City')) as MatInputHarness).setValue('Lakeport');
    const country = (await control(dialog, 'Country code')) as MatInputHarness;
    await country.setValue('ca');
    expect(
      await (
        await dialog.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Country code' }))
      ).getTextHints(),
    ).toEqual(['Canada']);
    await ((await control(dialog, 'Latitude')) as MatInputHarness).setValue('43.65');
    await ((await control(dialog, 'Longitude')) as MatInputHarness).setValue('-79.38');
    await ((await control(dialog, 'Time zone')) as MatSelectHarness).clickOptions({
      text: 'America/Toronto',
    });
    await ((await control(dialog, 'Carrier cut-off')) as MatInputHarness).setValue('16:30');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Add depot' }))).click();

    const request = http.expectOne(`/api/lenders/${lenderId}/depots`);
    expect(request.request.method).toBe('POST');
    expect(request.request.body).toEqual({
      name: 'Dralvik Lake Depot',
      addressLine: '9 Shore Road',
      city: 'Lakeport',
      postalCode: null,
      region: null,
      country: 'CA',
      latitude: 43.65,
      longitude: -79.38,
      timeZone: 'America/Toronto',
      receivingHours: null,
      cutoffTime: '16:30',
    });
    expect(depotInput.safeParse(request.request.body).success).toBe(true);
    request.flush(
      { depot: { ...fleetDepots[0], id: 503 } },
      { status: 201, statusText: 'Created' },
    );
  });

  it('changes an existing depot and refuses an impossible latitude', async () => {
    fixture.componentInstance.dialog.open<DepotDialog, DepotDialogData>(DepotDialog, {
      data: { lenderId, depot: fleetDepots[1] },
    });
    const dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Change Dralvik Central Depot');
    const latitude = (await control(dialog, 'Latitude')) as MatInputHarness;
    await latitude.setValue('95');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Save depot' }))).click();
    expect(
      await (
        await dialog.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Latitude' }))
      ).getTextErrors(),
    ).toEqual(['Use a value from −90 to 90.']);
    http.expectNone(`/api/lenders/${lenderId}/depots/502`);

    await latitude.setValue('50.1');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Save depot' }))).click();
    const request = http.expectOne(`/api/lenders/${lenderId}/depots/502`);
    expect(request.request.method).toBe('PUT');
    expect(request.request.body).toMatchObject({
      latitude: 50.1,
      timeZone: 'Europe/Berlin',
      cutoffTime: '14:00',
    });
    request.flush({ depot: { ...fleetDepots[1], latitude: 50.1 } });
  });
});
