// Screenshots for the user guide (docs/user-guide.md), taken from a running Evalon with the
// demo data loaded, at 1280×800:
//
//   node tests/e2e/screenshots.mjs [baseUrl]        (default http://127.0.0.1:8080)
//
// Saves docs/screenshots/sign-in.png, home-buyer.png, members.png, home-fleet.png and
// home-proctor.png. Every page is checked for what it must show before it is taken, and the
// script says (and exits with 1) when the icon font is not applied, since the pictures would
// then show icon names as words.
/* global document, getComputedStyle */
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from '@playwright/test';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const outDir = path.join(root, 'docs/screenshots');
const baseUrl = (process.argv[2] ?? 'http://127.0.0.1:8080').replace(/\/$/, '');
const viewport = { width: 1280, height: 800 };
const demoPassword = 'evalon-demo';

/** Pages whose icons did not draw in the icon font. */
const problems = [];

/** Waits until web fonts are in and nothing is loading, so the picture is the settled page. */
async function settle(page) {
  await page.evaluate(() => document.fonts.ready.then(() => undefined));
  await page.waitForFunction(() => !document.querySelector('mat-progress-bar'), null, {
    timeout: 10_000,
  });
  // Where the page has icons, they must draw in the icon font, not as their ligature names.
  const iconFonts = await page
    .locator('mat-icon')
    .evaluateAll((icons) => icons.map((icon) => getComputedStyle(icon).fontFamily));
  return iconFonts.every((family) => family.includes('Material Symbols'));
}

async function shoot(page, file) {
  const iconsOk = await settle(page);
  if (!iconsOk) problems.push(file);
  const target = path.join(outDir, file);
  await page.screenshot({ path: target, animations: 'disabled', caret: 'hide' });
  process.stdout.write(
    `saved ${path.relative(root, target)}${iconsOk ? '' : ' (icons not drawn)'}\n`,
  );
}

/** Signs in through the form and waits for the person's Home. */
async function signIn(page, email, firstName) {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail address').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(demoPassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL(`${baseUrl}/`);
  await page
    .getByRole('heading', { level: 1, name: new RegExp(`, ${firstName}$`) })
    .waitFor({ timeout: 15_000 });
  await page.getByRole('region', { name: 'Your next steps' }).waitFor();
}

/** A fresh browser profile per person, so sessions and remembered choices never mix. */
async function withPerson(browser, run) {
  const context = await browser.newContext({ viewport, deviceScaleFactor: 1, locale: 'en-US' });
  try {
    await run(await context.newPage());
  } finally {
    await context.close();
  }
}

async function main() {
  fs.mkdirSync(outDir, { recursive: true });
  const browser = await chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking'],
  });
  try {
    await withPerson(browser, async (page) => {
      await page.goto(`${baseUrl}/sign-in`);
      await page.getByRole('heading', { level: 1, name: 'Sign in to Evalon' }).waitFor();
      await shoot(page, 'sign-in.png');

      await signIn(page, 'buyer@velmora.example', 'Dana');
      await shoot(page, 'home-buyer.png');

      const nav = page.getByRole('navigation', { name: 'Main' });
      await nav.getByRole('link', { name: 'Members', exact: true }).click();
      await page.getByRole('heading', { level: 1, name: 'Members' }).waitFor();
      await page.getByRole('table').getByRole('row').nth(1).waitFor();
      // The pointer rests away from the table so no row shows a hover state.
      await page.mouse.move(viewport.width - 1, viewport.height - 1);
      await shoot(page, 'members.png');
    });
    await withPerson(browser, async (page) => {
      await signIn(page, 'fleet@quorvel.example', 'Marcus');
      await shoot(page, 'home-fleet.png');
    });
    await withPerson(browser, async (page) => {
      await signIn(page, 'proctor@proctors.example', 'Helena');
      await shoot(page, 'home-proctor.png');
    });
  } finally {
    await browser.close();
  }
  if (problems.length) {
    process.stderr.write(
      `Icons are drawn as words on ${problems.join(', ')}: the app's global stylesheet (icon ` +
        'font) is not applied. Fix that, rebuild and take the screenshots again.\n',
    );
    process.exitCode = 1;
  }
}

main().catch((error) => {
  process.stderr.write(`screenshots failed: ${error?.stack ?? error}\n`);
  process.exitCode = 1;
});
