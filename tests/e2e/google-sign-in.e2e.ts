import { expect, test } from '@playwright/test';
import { expectHome } from './helpers';

/**
 * "Continue with Google" against the local stand-in (infra/fakes/oauth/server.mjs): the button
 * leads to the stand-in's account chooser, which hands the chosen address to the app's callback.
 */
test.describe('signing in with Google', () => {
  test('an invited person picks their account on the chooser and lands signed in', async ({
    page,
    baseURL,
  }) => {
    await page.goto('/sign-in');
    await page.getByRole('link', { name: 'Continue with Google' }).click();

    // The stand-in's own origin (EVALON_OAUTH_PORT, 8089 by default), not the app's.
    await expect(page).toHaveURL(/^http:\/\/127\.0\.0\.1:\d+\/authorize\?/);
    expect(new URL(page.url()).origin).not.toBe(new URL(baseURL ?? '').origin);
    await expect(
      page.getByRole('heading', { level: 1, name: 'Evalon test sign-in' }),
    ).toBeVisible();
    await page.getByRole('button', { name: /clinician@velmora\.example/ }).click();

    await expectHome(page, 'Rafael Oyelaran');
    const me = await page.request.get('/api/auth/me');
    expect(me.status()).toBe(200);
    expect(((await me.json()) as { user: { email: string } }).user.email).toBe(
      'clinician@velmora.example',
    );
  });

  test('an address nobody was invited with is refused with a readable message', async ({
    page,
  }) => {
    const stranger = `stranger.${Date.now()}@elsewhere.example`;
    await page.goto('/sign-in');
    await page.getByRole('link', { name: 'Continue with Google' }).click();
    await expect(
      page.getByRole('heading', { level: 1, name: 'Evalon test sign-in' }),
    ).toBeVisible();
    await page.getByLabel('E-mail address').fill(stranger);
    await page.getByRole('button', { name: 'Continue', exact: true }).click();

    await expect(page).toHaveURL(/\/sign-in\?error=google_unknown$/);
    await expect(page.getByRole('heading', { level: 1, name: 'Sign in to Evalon' })).toBeVisible();
    await expect(page.getByRole('alert')).toContainText(
      'That Google account isn’t linked to anyone in Evalon yet. Ask your organisation to invite you with that e-mail address, or sign in with your e-mail and password.',
    );
    const me = await page.request.get('/api/auth/me');
    expect(me.status()).toBe(401);
  });
});
