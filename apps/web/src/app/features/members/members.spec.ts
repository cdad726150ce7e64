import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatMenuHarness } from '@angular/material/menu/testing';
import { MatPaginatorHarness } from '@angular/material/paginator/testing';
import { MatProgressBarHarness } from '@angular/material/progress-bar/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatSortHeaderHarness } from '@angular/material/sort/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { Router, provideRouter } from '@angular/router';
import type { Member } from '@evalon/contracts';
import type { HttpRequest } from '@angular/common/http';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { membership, organisations, person } from '../../testing/people';
import { Members } from './members';

const orgId = organisations.velmora.id;
const listUrl = `/api/organisations/${orgId}/members`;
/** Whether a request asks for a page of the member list. */
const isList = (r: HttpRequest<unknown>) => r.method === 'GET' && r.url === listUrl;

/** Invented people of Velmora Health. */
const team: Member[] = [
  {
    userId: 101,
    membershipId: 1,
    email: 'dana.whitlock@velmora.example',
    name: 'Dana Whitlock',
    role: 'buyer',
    active: true,
    pending: false,
    lastSignInAt: '2026-11-30T14:05:00.000Z',
  },
  {
    userId: 102,
    membershipId: 2,
    email: 'ravi.okafor@velmora.example',
    name: 'Ravi Okafor',
    role: 'clinician',
    active: true,
    pending: false,
    lastSignInAt: '2026-11-28T09:00:00.000Z',
  },
  {
    userId: 103,
    membershipId: 3,
    email: 'lena.marsh@velmora.example',
    name: 'Lena Marsh',
    role: 'clinician',
    active: true,
    pending: true,
    lastSignInAt: null,
  },
  {
    userId: 104,
    membershipId: 4,
    email: 'tom.becker@velmora.example',
    name: 'Tom Becker',
    role: 'buyer',
    active: false,
    pending: false,
    lastSignInAt: '2026-06-01T10:00:00.000Z',
  },
];

describe('Members', () => {
  let fixture: ComponentFixture<Members>;
  let loader: HarnessLoader;
  let root: HarnessLoader;
  let http: HttpTestingController;

  /**
   * Lets answers and timers land and the view update. Not `whenStable()`: a list request on its
   * way keeps the app unstable until the test answers it.
   */
  async function settle(): Promise<void> {
    await new Promise((resolve) => setTimeout(resolve));
    fixture.detectChanges();
    await new Promise((resolve) => setTimeout(resolve));
  }

  /** Clicks through the DOM (harnesses would wait for the request the click sends). */
  async function click(element: HTMLElement | null): Promise<void> {
    expect(element).not.toBeNull();
    element!.click();
    await settle();
  }

  const buttonWith = (text: string): HTMLElement | null =>
    [...(fixture.nativeElement as HTMLElement).querySelectorAll('button')].find((b) =>
      b.textContent?.includes(text),
    ) ?? null;

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
    TestBed.inject(SessionStore).setUser(person([membership('velmora', 'buyer')]));
  });

  /** Opens the page at `url` (its query string is the list's state). */
  async function open(url = '/'): Promise<void> {
    await TestBed.inject(Router).navigateByUrl(url);
    fixture = TestBed.createComponent(Members);
    fixture.componentRef.setInput('orgId', String(orgId));
    loader = TestbedHarnessEnvironment.loader(fixture);
    root = TestbedHarnessEnvironment.documentRootLoader(fixture);
    // Not `whenStable()`: a list request on its way keeps the app unstable until it is answered.
    await settle();
  }

  afterEach(() => http.verify());

  /** Answers the list request with `members` as the page (the server sorted them already). */
  async function loadTeam(members: Member[] = team, total = members.length): Promise<void> {
    http.expectOne(isList).flush({
      items: members,
      total,
      page: 0,
      size: 10,
      pending: members.filter((m) => m.active && m.pending).length,
      deactivated: members.filter((m) => !m.active).length,
    });
    await settle();
  }

  /** The name order the server answers with by default. */
  const byName = [...team].sort((a, b) => a.name.localeCompare(b.name));

  it('shows a loading bar until the list arrives', async () => {
    await open();
    // The DOM, not a harness: harnesses wait for stability, which the pending request holds off.
    expect(fixture.nativeElement.querySelectorAll('mat-progress-bar')).toHaveLength(1);
    await loadTeam();
    expect(await loader.getAllHarnesses(MatProgressBarHarness)).toHaveLength(0);
  });

  it('asks for the first page by name and lists the members with role and status', async () => {
    await open();
    const request = http.expectOne(isList);
    expect(request.request.params.toString()).toBe('page=0&size=10&sort=name,asc');
    request.flush({ items: byName, total: 4, page: 0, size: 10, pending: 1, deactivated: 1 });
    await settle();
    const table = await loader.getHarness(MatTableHarness);
    const rows = await table.getRows();
    const cells = await Promise.all(rows.map((row) => row.getCellTextByColumnName()));
    expect(cells.map((c) => c['name'])).toEqual([
      expect.stringContaining('Dana Whitlock'),
      expect.stringContaining('Lena Marsh'),
      expect.stringContaining('Ravi Okafor'),
      expect.stringContaining('Tom Becker'),
    ]);
    expect(cells[0]['name']).toContain('you');
    expect(cells.map((c) => c['status'])).toEqual([
      expect.stringContaining('Active'),
      expect.stringContaining('Invitation sent'),
      expect.stringContaining('Active'),
      expect.stringContaining('Deactivated'),
    ]);
    expect(cells.map((c) => c['role'])).toEqual([
      'Hospital buyer',
      expect.stringContaining('Clinician'),
      expect.stringContaining('Clinician'),
      'Hospital buyer',
    ]);
    expect(cells[1]['lastSignIn']).toBe('Not yet');
    expect(fixture.nativeElement.querySelector('.summary').textContent).toContain(
      '4 people · 1 invitation waiting · 1 deactivated',
    );
  });

  it('asks the server for what was typed, from the first page, and says when nothing matches', async () => {
    await open('/?page=2');
    await loadTeam(byName, 24);
    const filter = await loader.getHarness(MatInputHarness.with({ selector: '[type="search"]' }));
    await filter.setValue('clinician');
    await new Promise((resolve) => setTimeout(resolve, 350)); // the search waits for a pause
    const search = http.expectOne(isList);
    expect(search.request.params.get('q')).toBe('clinician');
    expect(search.request.params.get('page')).toBe('0');
    expect(TestBed.inject(Router).url).toBe('/?q=clinician');
    search.flush({
      items: byName.slice(1, 3),
      total: 2,
      page: 0,
      size: 10,
      pending: 1,
      deactivated: 0,
    });
    await settle();
    const table = await loader.getHarness(MatTableHarness);
    expect(await table.getRows()).toHaveLength(2);

    await filter.setValue('nobody by that name');
    await new Promise((resolve) => setTimeout(resolve, 350));
    await loadTeam([]);
    expect(await table.getRows()).toHaveLength(0);
    expect(fixture.nativeElement.querySelector('[ev-list-no-rows]').textContent).toContain(
      'No one matches “nobody by that name”.',
    );
  });

  it('keeps page, size and order in the URL, so a reload shows the same rows', async () => {
    await open('/?page=1&size=25&sort=role,desc');
    const request = http.expectOne(isList);
    expect(request.request.params.toString()).toBe('page=1&size=25&sort=role,desc');
    request.flush({ items: byName, total: 29, page: 1, size: 25, pending: 1, deactivated: 1 });
    await settle();
    const paginator = await loader.getHarness(MatPaginatorHarness);
    expect(await paginator.getRangeLabel()).toBe('26 – 29 of 29');
    expect(await paginator.getPageSize()).toBe(25);

    await click(fixture.nativeElement.querySelector('button[aria-label="Previous page"]'));
    expect(TestBed.inject(Router).url).toBe('/?size=25&sort=role,desc');
    http
      .expectOne((r) => isList(r) && r.params.get('page') === '0')
      .flush({
        items: byName,
        total: 29,
        page: 0,
        size: 25,
        pending: 1,
        deactivated: 1,
      });
    await settle();

    expect(
      await (
        await loader.getHarness(MatSortHeaderHarness.with({ label: 'Role' }))
      ).getSortDirection(),
    ).toBe('desc');
    await click(fixture.nativeElement.querySelector('th.mat-column-name'));
    expect(TestBed.inject(Router).url).toBe('/?size=25');
    await loadTeam();
  });

  it('shows an empty state with an invite button when nobody is listed', async () => {
    await open();
    await loadTeam([]);
    expect(fixture.nativeElement.textContent).toContain('No one here yet');
    expect(
      await loader.getAllHarnesses(MatButtonHarness.with({ text: /Invite someone/ })),
    ).toHaveLength(2);
  });

  it('shows the error and tries again', async () => {
    await open();
    http.expectOne(isList).flush('', { status: 503, statusText: 'Unavailable' });
    await settle();
    expect(fixture.nativeElement.textContent).toContain('Members couldn’t be loaded');
    await click(buttonWith('Try again'));
    await loadTeam();
    expect(await (await loader.getHarness(MatTableHarness)).getRows()).toHaveLength(4);
  });

  it('changes a role from the row’s select', async () => {
    await open();
    await loadTeam(byName);
    const select = await loader.getHarness(
      MatSelectHarness.with({ selector: '[aria-label="Role of Ravi Okafor"]' }),
    );
    await select.open();
    expect(await Promise.all((await select.getOptions()).map((o) => o.getText()))).toEqual([
      'Hospital buyer',
      'Clinician',
    ]);
    await select.clickOptions({ text: 'Hospital buyer' });
    const request = http.expectOne(`${listUrl}/2`);
    expect(request.request.method).toBe('PATCH');
    expect(request.request.body).toEqual({ role: 'buyer' });
    request.flush({});
    await settle();
    expect(await select.getValueText()).toBe('Hospital buyer');
  });

  it('deactivates only after confirmation', async () => {
    await open();
    await loadTeam(byName);
    const menus = await loader.getAllHarnesses(MatMenuHarness);
    // Rows are sorted by name and "you" has no menu: Lena, Ravi, Tom.
    await menus[1].clickItem({ text: /Deactivate/ });
    const dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Deactivate Ravi Okafor?');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Deactivate' }))).click();
    const request = http.expectOne(`${listUrl}/2/deactivate`);
    expect(request.request.method).toBe('POST');
    request.flush({});
    await settle();
    const cells = await (await loader.getHarness(MatTableHarness)).getCellTextByIndex();
    expect(cells[2]).toEqual(expect.arrayContaining([expect.stringContaining('Deactivated')]));
  });

  it('sends a pending person a fresh invitation link from the row menu', async () => {
    await open();
    await loadTeam(byName);
    const menus = await loader.getAllHarnesses(MatMenuHarness);
    // Rows are sorted by name and "you" has no menu: Lena (pending), Ravi, Tom.
    await menus[0].open();
    const texts = await Promise.all((await menus[0].getItems()).map((item) => item.getText()));
    // Item texts start with their icon's ligature name.
    expect(texts).toEqual([
      expect.stringContaining('Send the invitation again'),
      expect.stringContaining('Deactivate'),
    ]);
    await menus[0].clickItem({ text: /Send the invitation again/ });
    const request = http.expectOne(`${listUrl}/3/resend-invitation`);
    expect(request.request.method).toBe('POST');
    request.flush({ member: team[2] });
    await settle();
    expect(http.match(isList)).toHaveLength(0);
  });

  it('offers no new invitation link to people who have accepted', async () => {
    await open();
    await loadTeam(byName);
    const menus = await loader.getAllHarnesses(MatMenuHarness);
    await menus[1].open();
    const texts = await menus[1]
      .getItems()
      .then((items) => Promise.all(items.map((i) => i.getText())));
    expect(texts.some((t) => t.includes('Send the invitation again'))).toBe(false);
  });

  it('sends nothing when the confirmation is cancelled', async () => {
    await open();
    await loadTeam(byName);
    const menus = await loader.getAllHarnesses(MatMenuHarness);
    await menus[2].clickItem({ text: /Reactivate/ });
    const dialog = await root.getHarness(MatDialogHarness);
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Cancel' }))).click();
    await settle();
    http.expectNone(`${listUrl}/4/reactivate`);
  });

  describe('invite dialog', () => {
    async function openInvite(): Promise<MatDialogHarness> {
      await open();
      await loadTeam(byName);
      await (await loader.getHarness(MatButtonHarness.with({ text: /Invite someone/ }))).click();
      return root.getHarness(MatDialogHarness);
    }

    const fieldIn = (dialog: MatDialogHarness, label: string) =>
      dialog.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));

    it('says what is missing or wrong and sends nothing', async () => {
      const dialog = await openInvite();
      await (await dialog.getHarness(MatButtonHarness.with({ text: 'Send invitation' }))).click();
      expect(await (await fieldIn(dialog, 'Name')).getTextErrors()).toEqual([
        'Enter the person’s name.',
      ]);
      expect(await (await fieldIn(dialog, 'E-mail address')).getTextErrors()).toEqual([
        'Enter the person’s e-mail address.',
      ]);
      expect(await (await fieldIn(dialog, 'Role')).getTextErrors()).toEqual([
        'Choose what this person will do.',
      ]);

      const name = await (await fieldIn(dialog, 'Name')).getControl(MatInputHarness);
      await name?.setValue('   ');
      const email = await (await fieldIn(dialog, 'E-mail address')).getControl(MatInputHarness);
      await email?.setValue('not-an-address');
      expect(await (await fieldIn(dialog, 'Name')).getTextErrors()).toEqual([
        'Enter the person’s name.',
      ]);
      expect(await (await fieldIn(dialog, 'E-mail address')).getTextErrors()).toEqual([
        'Enter a valid e-mail address.',
      ]);
      http.expectNone(`/api/organisations/${orgId}/invitations`);
    });

    it('sends a tidy invitation and reloads the list', async () => {
      const dialog = await openInvite();
      await (
        await (await fieldIn(dialog, 'Name')).getControl(MatInputHarness)
      )?.setValue('  Priya Nandakumar ');
      await (
        await (await fieldIn(dialog, 'E-mail address')).getControl(MatInputHarness)
      )?.setValue('Priya.Nandakumar@Velmora.example');
      const role = await (await fieldIn(dialog, 'Role')).getControl(MatSelectHarness);
      await role?.clickOptions({ text: 'Clinician' });
      await (await dialog.getHarness(MatButtonHarness.with({ text: 'Send invitation' }))).click();

      const request = http.expectOne(`/api/organisations/${orgId}/invitations`);
      expect(request.request.body).toEqual({
        name: 'Priya Nandakumar',
        email: 'priya.nandakumar@velmora.example',
        role: 'clinician',
      });
      request.flush({}, { status: 201, statusText: 'Created' });
      await settle();
      await loadTeam(byName);
      expect(await root.getAllHarnesses(MatDialogHarness)).toHaveLength(0);
    });

    it('shows the server’s word on the e-mail field when the person is already a member', async () => {
      const dialog = await openInvite();
      await (
        await (await fieldIn(dialog, 'Name')).getControl(MatInputHarness)
      )?.setValue('Ravi Okafor');
      await (
        await (await fieldIn(dialog, 'E-mail address')).getControl(MatInputHarness)
      )?.setValue('ravi.okafor@velmora.example');
      await (
        await (await fieldIn(dialog, 'Role')).getControl(MatSelectHarness)
      )?.clickOptions({ text: 'Clinician' });
      await (await dialog.getHarness(MatButtonHarness.with({ text: 'Send invitation' }))).click();
      http
        .expectOne(`/api/organisations/${orgId}/invitations`)
        .flush(
          { error: { code: 'already_member', message: 'This person is already a member.' } },
          { status: 409, statusText: 'Conflict' },
        );
      await settle();
      expect(await (await fieldIn(dialog, 'E-mail address')).getTextErrors()).toEqual([
        'This person is already a member.',
      ]);
    });
  });
});
