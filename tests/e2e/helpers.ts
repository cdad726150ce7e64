import {
  expect,
  type Browser,
  type BrowserContext,
  type Locator,
  type Page,
} from '@playwright/test';

/** Password of every demo account (README, "Demo accounts"). */
export const demoPassword = 'evalon-demo';

/** maildev's HTTP API: `npm test` sets EVALON_INBOX_URL; the default is the local stand-in. */
export const inboxUrl = process.env.EVALON_INBOX_URL ?? 'http://127.0.0.1:1080';

/** The payments stand-in's address (its hosted pages and its `/__fake` control API). */
export const paymentsFakeUrl =
  process.env.EVALON_PAYMENTS_FAKE_URL ??
  `http://127.0.0.1:${process.env.EVALON_PAYMENTS_PORT ?? '12111'}`;

/** The greeting on Home: "Good morning|afternoon|evening, <first name>". */
export function greetingFor(firstName: string): RegExp {
  return new RegExp(`^Good (morning|afternoon|evening), ${escapeRegExp(firstName)}$`);
}

/** Escapes text for use inside a regular expression. */
export function escapeRegExp(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}

/**
 * A suffix that makes e-mail addresses and names unique per run, so the tests can run again
 * against a database that still holds the people an earlier run made.
 */
export function uniqueSuffix(): string {
  return `${Date.now().toString(36)}${Math.floor(Math.random() * 1296).toString(36)}`;
}

/** Fills the sign-in form and submits it (does not wait for the outcome). */
export async function submitSignIn(page: Page, email: string, password: string): Promise<void> {
  await page.goto('/sign-in');
  await expect(page.getByRole('heading', { level: 1, name: 'Sign in to Evalon' })).toBeVisible();
  await page.getByLabel('E-mail address').fill(email);
  // `exact`: the "Show password" toggle's label contains "password" too.
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
}

/** Signs in through the form and waits for Home with the person's greeting. */
export async function signIn(
  page: Page,
  email: string,
  name: string,
  password = demoPassword,
): Promise<void> {
  await submitSignIn(page, email, password);
  await expectHome(page, name);
}

/** Home is open for `name`: the greeting by first name and the account menu with the full name. */
export async function expectHome(page: Page, name: string): Promise<void> {
  await expect(page).toHaveURL(/\/$/);
  const firstName = name.split(/\s+/)[0] ?? name;
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(greetingFor(firstName));
  await expect(page.getByRole('button', { name: `Your account: ${name}` })).toBeVisible();
}

/** Signs out through the account menu and waits for the sign-in page. */
export async function signOut(page: Page, name: string): Promise<void> {
  await page.getByRole('button', { name: `Your account: ${name}` }).click();
  await page.getByRole('menuitem', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/\/sign-in\?reason=signed-out$/);
  await expect(page.getByRole('heading', { level: 1, name: 'Sign in to Evalon' })).toBeVisible();
}

/**
 * `items` are exactly these, in order, by accessible name. Icon ligatures inside links and
 * headings are hidden from assistive technology but still part of their text content, so
 * names, not texts, are compared.
 */
export async function expectNames(items: Locator, names: readonly string[]): Promise<void> {
  await expect(items).toHaveCount(names.length);
  for (const [index, name] of names.entries()) {
    await expect(items.nth(index)).toHaveAccessibleName(name);
  }
}

/** The side navigation holds exactly these links, in order. */
export async function expectNavigation(page: Page, labels: readonly string[]): Promise<void> {
  await expectNames(page.getByRole('navigation', { name: 'Main' }).getByRole('link'), labels);
}

/** One message as maildev 3's `GET /api/email` returns it (the fields the tests read). */
export interface InboxMessage {
  id: string;
  subject: string;
  text: string;
  html: string;
  to: { address: string; name?: string }[];
  time: string;
  /** Attached files (maildev lists each with its name and type). */
  attachments?: { fileName?: string; generatedFileName?: string; contentType?: string }[];
}

/**
 * Every message maildev holds for `address`. maildev 3 serves its API under `/api`
 * (`GET /api/email` lists, with dotted-path filters such as `to.address=`; `GET /api/email/:id`
 * reads one).
 */
export async function messagesTo(address: string): Promise<InboxMessage[]> {
  const url = `${inboxUrl}/api/email?${new URLSearchParams({ 'to.address': address })}`;
  const response = await fetch(url);
  if (!response.ok) throw new Error(`maildev answered ${response.status} for ${url}`);
  return (await response.json()) as InboxMessage[];
}

/**
 * Waits until at least `count` messages to `address` with a matching subject are in, and
 * returns them oldest first. The server sends e-mail through its outbox worker after the
 * transaction commits, so mail arrives a moment after the screen says "sent": poll, no sleeps.
 */
export async function waitForMessages(
  address: string,
  subject: RegExp,
  count = 1,
): Promise<InboxMessage[]> {
  let found: InboxMessage[] = [];
  await expect
    .poll(
      async () => {
        found = (await messagesTo(address)).filter((m) => subject.test(m.subject));
        return found.length;
      },
      { message: `${count} e-mail(s) to ${address} with subject ${subject}`, timeout: 20_000 },
    )
    .toBeGreaterThanOrEqual(count);
  return found.sort((a, b) => Date.parse(a.time) - Date.parse(b.time));
}

/** The first link in a message's plain text whose path starts with `path`. */
export function linkIn(message: InboxMessage, path: string): string {
  const link = message.text.match(/https?:\/\/\S+/g)?.find((url) => new URL(url).pathname === path);
  if (!link) throw new Error(`No ${path} link in the e-mail "${message.subject}"`);
  return link;
}

/** A person invited in a test: who they are and the password they chose. */
export interface NewPerson {
  name: string;
  email: string;
  password: string;
}

/** Opens Members from the side navigation and waits for the list to load. */
export async function openMembers(page: Page): Promise<void> {
  await page
    .getByRole('navigation', { name: 'Main' })
    .getByRole('link', { name: 'Members' })
    .click();
  await expect(page.getByRole('heading', { level: 1, name: 'Members' })).toBeVisible();
  await expect(page.getByRole('progressbar', { name: 'Loading members' })).toHaveCount(0);
}

/** Narrows the members table to one address and returns that person's row. */
export async function memberRow(page: Page, email: string): Promise<Locator> {
  await page.getByLabel('Filter by name, e-mail, role or status').fill(email);
  return page.getByRole('row').filter({ hasText: email });
}

/**
 * Invites `person` from the Members page that `page` shows (signed in as someone who manages
 * members), as `roleLabel`; waits for their row to show "Invitation sent".
 */
export async function invite(page: Page, person: NewPerson, roleLabel: string): Promise<void> {
  await page.getByRole('button', { name: 'Invite someone' }).first().click();
  const dialog = page.getByRole('dialog', { name: /^Invite someone to / });
  // The dialog moves focus to its first field once it has opened; on a busy machine that can
  // land after a fill has begun and send the next field's text into Name. Wait for it first.
  await expect(dialog.getByLabel('Name')).toBeFocused();
  await dialog.getByLabel('Name').fill(person.name);
  await dialog.getByLabel('E-mail address').fill(person.email);
  await dialog.getByRole('combobox', { name: 'Role' }).click();
  await page.getByRole('option', { name: roleLabel, exact: true }).click();
  await dialog.getByRole('button', { name: 'Send invitation' }).click();
  await expect(dialog).toHaveCount(0);
  const row = await memberRow(page, person.email);
  await expect(row).toContainText(person.name);
  await expect(row).toContainText('Invitation sent');
}

/** Subject of the invitation e-mail (packages/messages/src/account.ts). */
export function invitationSubject(organisationName: string): RegExp {
  return new RegExp(`^You are invited to join ${escapeRegExp(organisationName)} on Evalon$`);
}

/** The invitee's own browser: a fresh context (no cookies) on the app's public address. */
export async function inviteeBrowser(
  browser: Browser,
  link: string,
): Promise<{ context: BrowserContext; page: Page }> {
  // The link carries the app's public address (EVALON_PUBLIC_URL); the invitee starts there.
  const context = await browser.newContext({
    baseURL: new URL(link).origin,
    viewport: { width: 1280, height: 800 },
  });
  return { context, page: await context.newPage() };
}

/** Opens an invitation link and submits the password form (does not wait for the outcome). */
export async function submitInvitation(page: Page, link: string, password: string): Promise<void> {
  await page.goto(link);
  await expect(
    page.getByRole('heading', { level: 1, name: 'Join your organisation on Evalon' }),
  ).toBeVisible();
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByLabel('Type the password again').fill(password);
  await page.getByRole('button', { name: 'Join and continue' }).click();
}

/**
 * Reads the invitation e-mail, opens its link in the invitee's own browser, sets the password
 * and waits for the invitee's Home. Returns that browser, still signed in as the invitee.
 */
export async function acceptInvitation(
  browser: Browser,
  person: NewPerson,
  organisationName: string,
): Promise<{ context: BrowserContext; page: Page }> {
  const [message] = await waitForMessages(person.email, invitationSubject(organisationName));
  expect(message.text).toContain(`Hello ${person.name},`);
  const link = linkIn(message, '/accept-invitation');
  const invitee = await inviteeBrowser(browser, link);
  await submitInvitation(invitee.page, link, person.password);
  await expectHome(invitee.page, person.name);
  return invitee;
}
