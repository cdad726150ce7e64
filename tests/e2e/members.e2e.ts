import { expect, test } from '@playwright/test';
import {
  acceptInvitation,
  expectHome,
  invitationSubject,
  invite,
  inviteeBrowser,
  linkIn,
  memberRow,
  openMembers,
  signIn,
  submitInvitation,
  submitSignIn,
  uniqueSuffix,
  waitForMessages,
  type NewPerson,
} from './helpers';

const buyer = { email: 'buyer@velmora.example', name: 'Dana Whitcombe' };
const hospital = 'Velmora Health';

/** A new person for one test: unique address (and name) per run, so reruns never collide. */
function newPerson(first: string): NewPerson {
  const suffix = uniqueSuffix();
  return {
    name: `${first} Marwick ${suffix}`,
    email: `new.person+${suffix}@velmora.example`,
    password: `Wide-lagoon-${suffix}`,
  };
}

test.describe('members of a hospital', () => {
  test('a buyer invites a new person, who accepts by e-mail and then shows as active', async ({
    page,
    browser,
  }) => {
    const person = newPerson('Imogen');
    await signIn(page, buyer.email, buyer.name);
    await openMembers(page);
    await invite(page, person, 'Clinician');

    // The invitee's own browser: the link from the e-mail, a password, and they are in.
    const invitee = await acceptInvitation(browser, person, hospital);
    await expect(invitee.page.getByRole('main')).toContainText(`${hospital} · Hospital network`);
    await expect(invitee.page.getByRole('main')).toContainText('Clinician');
    await invitee.context.close();

    // Back with the buyer: the list, read again from the server, shows the person as active.
    await page.reload();
    await expect(page.getByRole('heading', { level: 1, name: 'Members' })).toBeVisible();
    const row = await memberRow(page, person.email);
    await expect(row).toContainText(person.name);
    await expect(row).toContainText('Active');
    await expect(row).not.toContainText('Invitation sent');
    await expect(row.getByRole('combobox', { name: `Role of ${person.name}` })).toContainText(
      'Clinician',
    );
  });

  test('sending the invitation again retires the first link', async ({ page, browser }) => {
    const person = newPerson('Tamsin');
    await signIn(page, buyer.email, buyer.name);
    await openMembers(page);
    await invite(page, person, 'Clinician');
    // Wait for the first e-mail, so "first" and "second" are told apart by arrival.
    await waitForMessages(person.email, invitationSubject(hospital), 1);

    const row = await memberRow(page, person.email);
    await row.getByRole('button', { name: `More for ${person.name}` }).click();
    await page.getByRole('menuitem', { name: 'Send the invitation again' }).click();
    await expect(
      page.getByText(`A new invitation is on its way to ${person.email}.`),
    ).toBeVisible();
    const [first, second] = await waitForMessages(person.email, invitationSubject(hospital), 2);
    const oldLink = linkIn(first, '/accept-invitation');
    const newLink = linkIn(second, '/accept-invitation');
    expect(newLink).not.toBe(oldLink);

    const invitee = await inviteeBrowser(browser, oldLink);
    await submitInvitation(invitee.page, oldLink, person.password);
    await expect(invitee.page.getByRole('alert')).toContainText(
      'This invitation link has already been used.',
    );
    await expect(invitee.page).toHaveURL(/\/accept-invitation\?token=/);

    await submitInvitation(invitee.page, newLink, person.password);
    await expectHome(invitee.page, person.name);
    await invitee.context.close();
  });

  test('a deactivated member is signed out and refused at sign-in', async ({ page, browser }) => {
    const person = newPerson('Lucan');
    await signIn(page, buyer.email, buyer.name);
    await openMembers(page);
    await invite(page, person, 'Clinician');
    const invitee = await acceptInvitation(browser, person, hospital);

    const row = await memberRow(page, person.email);
    await row.getByRole('button', { name: `More for ${person.name}` }).click();
    await page.getByRole('menuitem', { name: 'Deactivate' }).click();
    const confirm = page.getByRole('alertdialog', { name: `Deactivate ${person.name}?` });
    await expect(confirm).toContainText(`won’t be able to sign in to ${hospital}`);
    await confirm.getByRole('button', { name: 'Deactivate' }).click();
    await expect(confirm).toHaveCount(0);
    await expect(row).toContainText('Deactivated');

    // Deactivation ends the person's sessions: their open page loses its session.
    await invitee.page.goto('/profile');
    await expect(invitee.page).toHaveURL(/\/sign-in\?returnUrl=%2Fprofile$/);

    // Signing in again with the right password is refused with the reason.
    await submitSignIn(invitee.page, person.email, person.password);
    await expect(invitee.page.getByRole('alert')).toContainText(
      'This account has been deactivated. Ask someone who manages members of your organisation to reactivate it.',
    );
    await expect(invitee.page).toHaveURL(/\/sign-in$/);

    // ...and so is Google sign-in with the same address.
    await invitee.page.getByRole('link', { name: 'Continue with Google' }).click();
    await invitee.page.getByLabel('E-mail address').fill(person.email);
    await invitee.page.getByRole('button', { name: 'Continue', exact: true }).click();
    await expect(invitee.page).toHaveURL(/\/sign-in\?error=account_deactivated$/);
    await expect(invitee.page.getByRole('alert')).toContainText(
      'This account has been deactivated.',
    );
    const me = await invitee.page.request.get('/api/auth/me');
    expect(me.status()).toBe(401);
    await invitee.context.close();
  });
});
