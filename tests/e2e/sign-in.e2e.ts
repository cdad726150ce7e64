import { expect, test } from '@playwright/test';
import {
  demoPassword,
  expectHome,
  expectNames,
  expectNavigation,
  signIn,
  signOut,
  submitSignIn,
} from './helpers';

/** What each demo person should see after signing in (demo data: server/src/demo/demo-data.ts). */
interface RoleCase {
  email: string;
  name: string;
  /** The line above the greeting: organisation · kind of organisation · role. */
  context: string;
  /** Side navigation, in order: Home, the pages the role opens, Members for managers. */
  navigation: string[];
  /** Headings of the "Your next steps" cards on Home. */
  cards: string[];
}

const roleCases: RoleCase[] = [
  {
    email: 'admin@evalon.example',
    name: 'Noor Lindqvist',
    context: 'Evalon Marketplace · Marketplace operator · Marketplace admin',
    navigation: ['Home', 'Organisations', 'Audit', 'E-mail outbox', 'Members'],
    cards: ['E-mail outbox', 'Members'],
  },
  {
    email: 'buyer@velmora.example',
    name: 'Dana Whitcombe',
    context: 'Velmora Health · Hospital network · Hospital buyer',
    navigation: ['Home', 'Find equipment', 'Loans', 'Proctoring', 'Visit settings', 'Members'],
    cards: ['Evaluation loans', 'Proctoring visits', 'Members'],
  },
  {
    email: 'clinician@velmora.example',
    name: 'Rafael Oyelaran',
    context: 'Velmora Health · Hospital network · Clinician',
    navigation: ['Home', 'Loans', 'Proctoring', 'My training', 'Schedule', 'Case log'],
    cards: ['Arrivals and visits', 'Evaluation cases', 'My training'],
  },
  {
    email: 'buyer@orlenbach.example',
    name: 'Friederike Albrecht-Sommer',
    context: 'Klinikum Orlenbach · Hospital network · Hospital buyer',
    navigation: ['Home', 'Find equipment', 'Loans', 'Proctoring', 'Visit settings', 'Members'],
    cards: ['Evaluation loans', 'Proctoring visits', 'Members'],
  },
  {
    email: 'fleet@quorvel.example',
    name: 'Marcus Tennant-Hale',
    context: 'Quorvel Surgical · Lender · Fleet manager',
    navigation: [
      'Home',
      'Shipments',
      'Catalog',
      'Approvals',
      'Credit agreements',
      'Units',
      'Visit settings',
      'Members',
    ],
    cards: ['Loan requests', 'Catalog', 'Members'],
  },
  {
    email: 'coordinator@quorvel.example',
    name: 'Priya Ramaswamy-Cole',
    context: 'Quorvel Surgical · Lender · Logistics coordinator',
    navigation: ['Home', 'Shipments', 'Units'],
    cards: ['Shipments', 'Returns'],
  },
  {
    email: 'proctor@proctors.example',
    name: 'Helena Osterby',
    context: 'Osterby Proctoring Practice · Proctor practice · Proctor',
    navigation: ['Home', 'Visit offers', 'Credentials', 'Calendar'],
    cards: ['Visit offers', 'Credentials'],
  },
];

test.describe('signing in and out with a password', () => {
  for (const person of roleCases) {
    test(`${person.email} lands on Home with their navigation, and signs out`, async ({ page }) => {
      await signIn(page, person.email, person.name);

      const main = page.getByRole('main');
      await expect(main.getByText(person.context, { exact: true })).toBeVisible();
      await expectNavigation(page, person.navigation);
      const cards = page
        .getByRole('region', { name: 'Your next steps' })
        .getByRole('heading', { level: 3 });
      await expectNames(cards, person.cards);
      // The cautions are on every home page (product brief, "Cautions the product shows").
      await expect(page.getByRole('note', { name: /What Evalon does/ })).toContainText(
        'it does not certify anyone',
      );

      await signOut(page, person.name);
      await expect(page.getByText('You’re signed out. See you soon.')).toBeVisible();

      // A page behind sign-in now sends the browser to sign-in, remembering where it wanted to go.
      await page.goto('/profile');
      await expect(page).toHaveURL(/\/sign-in\?returnUrl=%2Fprofile$/);
      await expect(
        page.getByRole('heading', { level: 1, name: 'Sign in to Evalon' }),
      ).toBeVisible();
      // The session really ended on the server, not only in the page.
      const me = await page.request.get('/api/auth/me');
      expect(me.status()).toBe(401);
    });
  }

  test('after signing in from a protected address, the person lands on that address', async ({
    page,
  }) => {
    await page.goto('/profile');
    await expect(page).toHaveURL(/\/sign-in\?returnUrl=%2Fprofile$/);
    await page.getByLabel('E-mail address').fill('clinician@velmora.example');
    await page.getByLabel('Password', { exact: true }).fill(demoPassword);
    await page.getByRole('button', { name: 'Sign in', exact: true }).click();
    await expect(page).toHaveURL(/\/profile$/);
  });
});

test('the app stylesheet applies, so icons draw as icons and not as their names', async ({
  page,
}) => {
  await page.goto('/sign-in');
  const toggleIcon = page.getByRole('button', { name: 'Show password' }).locator('mat-icon');
  await expect(toggleIcon).toBeVisible();
  // The icon font is declared in the global stylesheet (apps/web/src/styles.scss); without it
  // the ligature "visibility" shows as a word in the password field.
  await expect(toggleIcon).toHaveCSS('font-family', /Material Symbols Outlined/);
  const sheetsNotApplied = await page.evaluate(() =>
    [...document.styleSheets]
      .filter((sheet) => sheet.href !== null && sheet.media.mediaText === 'print')
      .map((sheet) => sheet.href),
  );
  expect(sheetsNotApplied, 'stylesheets left at media="print"').toEqual([]);
});

test('a wrong password shows a readable message and stays on sign-in', async ({ page }) => {
  await submitSignIn(page, 'buyer@orlenbach.example', 'not-the-password');

  await expect(page.getByRole('alert')).toContainText(
    'That e-mail address and password don’t match. Check both and try again.',
  );
  await expect(page).toHaveURL(/\/sign-in$/);
  await expect(page.getByRole('heading', { level: 1, name: 'Sign in to Evalon' })).toBeVisible();
  // The password is cleared for the next try; the address stays.
  await expect(page.getByLabel('Password', { exact: true })).toHaveValue('');
  await expect(page.getByLabel('E-mail address')).toHaveValue('buyer@orlenbach.example');
  const me = await page.request.get('/api/auth/me');
  expect(me.status()).toBe(401);

  // The right password still works afterwards (one failure is far below the lock-out limit).
  await page.getByLabel('Password', { exact: true }).fill(demoPassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expectHome(page, 'Friederike Albrecht-Sommer');
});

test('asking for a password reset shows the same neutral confirmation for any address', async ({
  page,
}) => {
  // Whether an address has an account must not show (OWASP Authentication Cheat Sheet,
  // "Authentication and Error Messages"): a known and an unknown address get the same words.
  for (const email of ['clinician@orlenbach.example', `nobody.${Date.now()}@unknown.example`]) {
    await page.goto('/sign-in');
    await page.getByRole('link', { name: 'Forgot your password?' }).click();
    await expect(
      page.getByRole('heading', { level: 1, name: 'Reset your password' }),
    ).toBeVisible();
    await page.getByLabel('E-mail address').fill(email);
    await page.getByRole('button', { name: 'Send reset link' }).click();
    await expect(page.getByRole('status')).toContainText(
      `If an Evalon account uses ${email}, a reset link is on its way. It can take a few minutes to arrive; check your spam folder too.`,
    );
    await expect(page.getByRole('button', { name: 'Send reset link' })).toHaveCount(0);
  }
});
