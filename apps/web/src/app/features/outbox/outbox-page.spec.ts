import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { outboxMessage } from '../../testing/payments';
import { membership, person } from '../../testing/people';
import { OutboxPage } from './outbox-page';

const approvedMail = outboxMessage({
  id: 7,
  subject: 'Loan EV-2026-000011 approved: secure the deposit',
  attachmentCount: 0,
  createdAt: '2026-12-01T14:05:00.000Z',
});
const confirmedMail = outboxMessage({
  id: 8,
  subject: 'Loan EV-2026-000012 confirmed',
  to: ['priya.lennox@dralvik.example'],
  attachmentCount: 1,
  attempts: 10,
  lastError: 'connect ECONNREFUSED 127.0.0.1:1025',
});

describe('OutboxPage', () => {
  let fixture: ComponentFixture<OutboxPage>;
  let loader: HarnessLoader;
  let root: HarnessLoader;
  let http: HttpTestingController;

  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  };

  async function open(): Promise<void> {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(
      person([membership('dralvik', 'admin')], { timeZone: 'America/New_York' }),
    );
    fixture = TestBed.createComponent(OutboxPage);
    loader = TestbedHarnessEnvironment.loader(fixture);
    root = TestbedHarnessEnvironment.documentRootLoader(fixture);
    await fixture.whenStable();
    http
      .expectOne('/api/admin/outbox?status=parked&limit=100')
      .flush({ items: [approvedMail, confirmedMail] });
    await settle();
  }

  afterEach(() => http.verify());

  it('lists parked e-mails with recipient, subject, attempts, last error and creation time', async () => {
    await open();
    const table = await loader.getHarness(MatTableHarness);
    const rows = await table.getCellTextByColumnName();
    expect(rows['to']!.text).toEqual([
      'dana.whitlock@velmora.example',
      'priya.lennox@dralvik.example',
    ]);
    expect(rows['subject']!.text).toEqual([
      'Loan EV-2026-000011 approved: secure the deposit',
      'Loan EV-2026-000012 confirmed · 1 attachment',
    ]);
    expect(rows['attempts']!.text).toEqual(['8', '10']);
    expect(rows['lastError']!.text).toEqual([
      '421 4.7.0 Try again later',
      'connect ECONNREFUSED 127.0.0.1:1025',
    ]);
    // 14:05 UTC is 9:05 AM in New York in December.
    expect(rows['created']!.text[0]).toBe('Dec 1, 2026, 9:05 AM EST');
  });

  it('sends a parked e-mail again only after confirmation, and takes it off the list', async () => {
    await open();
    const buttons = await loader.getAllHarnesses(MatButtonHarness.with({ text: /Send again/ }));
    expect(buttons).toHaveLength(2);

    await buttons[0]!.click();
    let dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Send this e-mail again?');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Cancel' }))).click();
    http.expectNone('/api/admin/outbox/7/resend');

    await buttons[0]!.click();
    dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getText()).toContain('dana.whitlock@velmora.example');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Send again' }))).click();
    const resend = http.expectOne('/api/admin/outbox/7/resend');
    expect(resend.request.method).toBe('POST');
    resend.flush({ message: { ...approvedMail, status: 'pending', attempts: 0 } });
    await settle();

    const rows = await (await loader.getHarness(MatTableHarness)).getCellTextByColumnName();
    expect(rows['subject']!.text).toEqual(['Loan EV-2026-000012 confirmed · 1 attachment']);
  });

  it('reloads when someone else sent it again first (409)', async () => {
    await open();
    await (await loader.getAllHarnesses(MatButtonHarness.with({ text: /Send again/ })))[1]!.click();
    await (
      await (
        await root.getHarness(MatDialogHarness)
      ).getHarness(MatButtonHarness.with({ text: 'Send again' }))
    ).click();
    http
      .expectOne('/api/admin/outbox/8/resend')
      .flush(
        { error: { code: 'not_parked', message: 'Only parked messages can be sent again.' } },
        { status: 409, statusText: 'Conflict' },
      );
    await settle();
    http.expectOne('/api/admin/outbox?status=parked&limit=100').flush({ items: [approvedMail] });
    await settle();
    const rows = await (await loader.getHarness(MatTableHarness)).getCellTextByColumnName();
    expect(rows['attempts']!.text).toEqual(['8']);
  });

  it('shows other statuses without the send button, and an empty state', async () => {
    await open();
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'Sent' }))).check();
    http.expectOne('/api/admin/outbox?status=sent&limit=100').flush({ items: [] });
    await settle();
    expect(fixture.nativeElement.textContent).toContain('Nothing sent yet');
    await (
      await loader.getHarness(MatButtonToggleHarness.with({ text: 'Could not be delivered' }))
    ).check();
    http.expectOne('/api/admin/outbox?status=parked&limit=100').flush({ items: [] });
    await settle();
    expect(fixture.nativeElement.textContent).toContain('Every e-mail was delivered');
  });
});
