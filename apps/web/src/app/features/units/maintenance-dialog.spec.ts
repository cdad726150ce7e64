import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatDateRangeInputHarness } from '@angular/material/datepicker/testing';
import { MatDialog } from '@angular/material/dialog';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter } from '@angular/router';
import type { Hold } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { fleetHold, fleetUnit } from '../catalog/fleet-fixtures';
import { MaintenanceDialog, MaintenanceDialogData } from './maintenance-dialog';

/** Opens the dialog the way the unit page does and keeps what it closed with. */
@Component({ template: '', changeDetection: ChangeDetectionStrategy.OnPush })
class Opener {
  private readonly dialog = inject(MatDialog);
  readonly result = signal<Hold | undefined | null>(null);

  open(data: MaintenanceDialogData): void {
    this.dialog
      .open<MaintenanceDialog, MaintenanceDialogData, Hold>(MaintenanceDialog, { data })
      .afterClosed()
      .subscribe((hold) => this.result.set(hold));
  }
}

describe('MaintenanceDialog', () => {
  let fixture: ComponentFixture<Opener>;
  let root: HarnessLoader;
  let http: HttpTestingController;
  const unit = fleetUnit();

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
    fixture = TestBed.createComponent(Opener);
    root = TestbedHarnessEnvironment.documentRootLoader(fixture);
    fixture.componentInstance.open({ unit });
    await settle();
  });

  afterEach(() => http.verify());

  async function fill(dialog: MatDialogHarness, start: string, end: string, reason: string) {
    const range = await dialog.getHarness(MatDateRangeInputHarness);
    // The native date adapter reads US-style dates, as the hint says.
    await (await range.getStartInput()).setValue(start);
    await (await range.getEndInput()).setValue(end);
    const reasonField = await dialog.getHarness(
      MatFormFieldHarness.with({ floatingLabelText: 'Reason' }),
    );
    await ((await reasonField.getControl()) as MatInputHarness).setValue(reason);
  }

  it('asks for the days and a reason before sending anything', async () => {
    const dialog = await root.getHarness(MatDialogHarness);
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Block these days' }))).click();
    expect(
      await (
        await dialog.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Days blocked' }))
      ).getTextErrors(),
    ).toEqual(['Choose the first and the last day.']);
    expect(
      await (
        await dialog.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Reason' }))
      ).getTextErrors(),
    ).toEqual(['Say in a few words why the unit is blocked.']);
    http.expectNone(`/api/units/${unit.id}/holds`);
  });

  it('keeps the dialog open with the server’s explanation when the days overlap a loan (409)', async () => {
    const dialog = await root.getHarness(MatDialogHarness);
    await fill(dialog, '3/5/2027', '3/9/2027', 'Annual electrical safety test');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Block these days' }))).click();

    const request = http.expectOne(`/api/units/${unit.id}/holds`);
    expect(request.request.method).toBe('POST');
    expect(request.request.body).toEqual({
      start: '2027-03-05',
      end: '2027-03-09',
      reason: 'Annual electrical safety test',
    });
    const message =
      'The unit is held for loan EV-2027-000101 from 2027-03-01 to 2027-03-12; move the ' +
      'maintenance or settle the loan first.';
    request.flush(
      { error: { code: 'hold_conflict', message, details: { holds: [] } } },
      { status: 409, statusText: 'Conflict' },
    );
    await settle();

    const alert = document.querySelector('ev-maintenance-dialog [role="alert"]')!;
    expect(alert.textContent).toContain('These days clash with another hold');
    expect(alert.textContent).toContain(message);
    // Still open, nothing returned: the person can move the dates and try again.
    expect(await root.getAllHarnesses(MatDialogHarness)).toHaveLength(1);
    expect(fixture.componentInstance.result()).toBeNull();

    await fill(dialog, '3/15/2027', '3/16/2027', 'Annual electrical safety test');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Block these days' }))).click();
    const retry = http.expectOne(`/api/units/${unit.id}/holds`);
    expect(retry.request.body.start).toBe('2027-03-15');
    const hold = fleetHold({
      id: 8100,
      kind: 'maintenance',
      start: '2027-03-15',
      end: '2027-03-16',
      loanId: null,
      loanReference: null,
      hospitalName: null,
      reason: 'Annual electrical safety test',
      label: 'Maintenance',
    });
    retry.flush({ hold }, { status: 201, statusText: 'Created' });
    await settle();
    expect(await root.getAllHarnesses(MatDialogHarness)).toHaveLength(0);
    expect(fixture.componentInstance.result()).toEqual(hold);
  });

  it('says when the last day is before the first', async () => {
    const dialog = await root.getHarness(MatDialogHarness);
    await fill(dialog, '3/9/2027', '3/5/2027', 'Service');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Block these days' }))).click();
    expect(
      await (
        await dialog.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Days blocked' }))
      ).getTextErrors(),
    ).toEqual(['The last day is before the first.']);
    http.expectNone(`/api/units/${unit.id}/holds`);
  });
});
