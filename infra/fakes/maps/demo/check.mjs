// Real-browser check of the offline maps stand-in: serves demo/index.html and the built script
// (at /maps/api/js, as the Evalon server does) on 127.0.0.1, drives Debian's Chromium through
// Playwright, checks what a person would see and do, and saves a 1280×800 screenshot.
//
//   node infra/fakes/maps/demo/check.mjs [--out=docs/screenshots/maps-standin.png]
//
// Prints one line per check and ends with `N passed, N failed`; exits non-zero on a failure.
/* global window, document -- used inside page.evaluate callbacks, which run in the browser */
import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { mapsStandinPath } from '../index.mjs';

const here = path.dirname(fileURLToPath(import.meta.url));
const repo = path.resolve(here, '../../../..');
const outArg = process.argv.find((a) => a.startsWith('--out='));
const shot = path.resolve(repo, outArg ? outArg.slice(6) : 'docs/screenshots/maps-standin.png');
const extraShots = process.argv.includes('--extra-shots');

const script = await mapsStandinPath();
// The Angular harness: the real @angular/google-maps components, bundled (JIT) into demo/dist.
const angularBundle = path.join(here, 'dist', 'angular-app.js');
const esbuild = await import('esbuild');
await esbuild.build({
  entryPoints: [path.join(here, 'angular-app.js')],
  bundle: true,
  format: 'iife',
  target: 'es2022',
  outfile: angularBundle,
  logLevel: 'warning',
});
const server = http.createServer((req, res) => {
  const url = new URL(req.url ?? '/', 'http://127.0.0.1');
  if (url.pathname === '/maps/api/js') {
    res.writeHead(200, { 'content-type': 'text/javascript; charset=utf-8' });
    fs.createReadStream(script).pipe(res);
  } else if (url.pathname === '/' || url.pathname === '/index.html') {
    res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' });
    fs.createReadStream(path.join(here, 'index.html')).pipe(res);
  } else if (url.pathname === '/angular.html') {
    res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' });
    fs.createReadStream(path.join(here, 'angular.html')).pipe(res);
  } else if (url.pathname === '/angular-app.js') {
    res.writeHead(200, { 'content-type': 'text/javascript; charset=utf-8' });
    fs.createReadStream(angularBundle).pipe(res);
  } else if (url.pathname === '/favicon.ico') {
    res.writeHead(204).end();
  } else {
    res.writeHead(404).end();
  }
});
await new Promise((resolve) => server.listen(0, '127.0.0.1', resolve));
const base = `http://127.0.0.1:${server.address().port}`;

const { chromium } = await import('@playwright/test');
const browser = await chromium.launch({
  executablePath: '/usr/bin/chromium',
  args: [
    '--no-sandbox',
    '--disable-gpu',
    '--disable-background-networking',
    '--disable-component-update',
    '--disable-sync',
    '--no-first-run',
  ],
});

let passed = 0;
let failed = 0;
function check(name, ok, detail = '') {
  if (ok) passed++;
  else failed++;
  console.log(`${ok ? 'ok  ' : 'FAIL'} ${name}${detail ? ` (${detail})` : ''}`);
}

try {
  const page = await browser.newPage({ viewport: { width: 1280, height: 800 } });
  const errors = [];
  page.on('pageerror', (e) => errors.push(String(e)));
  page.on('console', (m) => m.type() === 'error' && errors.push(m.text()));
  await page.goto(base);
  await page.waitForSelector('body[data-ready="evalon-offline"]', { timeout: 10_000 });
  await page.waitForFunction(() => window.__demo.events.includes('idle'));

  const state = () =>
    page.evaluate(() => {
      const { map } = window.__demo;
      const c = map.getCenter();
      return { zoom: map.getZoom(), lat: c.lat(), lng: c.lng(), bounds: map.getBounds().toJSON() };
    });

  // Callback from the script URL ran, fitBounds chose a zoom, and every marker is in view.
  const s0 = await state();
  check('callback query parameter called onMapsReady', true, `version evalon-offline`);
  check('fitBounds picked zoom 3 for the four sites in 1280×800', s0.zoom === 3, `zoom ${s0.zoom}`);
  const boxes = await page.$$eval('.evm-marker', (els) =>
    els.map((el) => {
      const r = el.getBoundingClientRect();
      return { label: el.getAttribute('aria-label'), x: r.x, y: r.y, w: r.width, h: r.height };
    }),
  );
  const inView = boxes.every((b) => b.x >= 0 && b.y >= 0 && b.x + b.w <= 1280 && b.y + b.h <= 800);
  check(
    'four marker pins inside the viewport',
    boxes.length === 4 && inView,
    JSON.stringify(boxes.map((b) => [b.label, Math.round(b.x), Math.round(b.y)])),
  );

  // Land is drawn: the land path has thousands of points and its box spans the world.
  const land = await page.evaluate(() => ({
    len: document.querySelector('.evm-land').getAttribute('d').length,
    box: document.querySelector('.evm-copies').getBoundingClientRect(),
  }));
  // At zoom 3 the world is 2048 px wide; the drawn land spans about that.
  check(
    'country outlines drawn',
    land.len > 50_000 && land.box.width > 1900,
    `d ${land.len} chars, drawn ${Math.round(land.box.width)}×${Math.round(land.box.height)} px`,
  );

  // Pixel colours: ocean west of Portugal, land in the US Midwest, read from a screenshot.
  const colourAt = async (lat, lng) => {
    const px = await page.evaluate(
      ([la, ln]) => window.__demo.map.pixelFor({ lat: la, lng: ln }),
      [lat, lng],
    );
    const buf = await page.screenshot({
      clip: { x: Math.round(px.x), y: Math.round(px.y), width: 1, height: 1 },
    });
    return { px, png: buf.toString('base64') };
  };
  const ocean = await colourAt(40, -30);
  const landPx = await colourAt(39, -98);
  check('ocean and land pixels differ', ocean.png !== landPx.png);

  // Click a marker → info window with its text; Escape closes it and focus returns to the pin.
  await page.click('.evm-marker[aria-label="Chicago depot"]');
  await page.waitForSelector('.evm-info-frame[role="dialog"]');
  const infoText = await page.textContent('.evm-info-body');
  check(
    'marker click opens the info window',
    infoText?.includes('Chicago depot') ?? false,
    infoText ?? '',
  );
  const tail = await page.$eval('.evm-info-tail', (el) => el.getBoundingClientRect());
  const pin = await page.$eval('.evm-marker[aria-label="Chicago depot"]', (el) =>
    el.getBoundingClientRect(),
  );
  check(
    'info window tail sits just above the pin',
    Math.abs(tail.x + tail.width / 2 - (pin.x + pin.width / 2)) < 2 &&
      tail.bottom <= pin.y + 1 &&
      tail.bottom > pin.y - 8,
    `tail bottom ${tail.bottom.toFixed(1)}, pin top ${pin.y.toFixed(1)}`,
  );
  const mapClicksBefore = await page.evaluate(
    () => window.__demo.events.filter((e) => e === 'click').length,
  );
  check('a marker click is not a map click', mapClicksBefore === 0);

  await page.screenshot({ path: shot });
  check('screenshot saved', fs.existsSync(shot), path.relative(repo, shot));

  await page.click('.evm-info-close');
  check('close button closes the info window', (await page.$('.evm-info')) === null);

  // Keyboard: Tab to a marker, Enter opens the info window with focus inside, Escape returns.
  await page.focus('.evm-marker[aria-label="Boston campus"]');
  await page.keyboard.press('Enter');
  await page.waitForSelector('.evm-info-frame');
  const infoOpen = await page.evaluate(() => window.__demo.clicks.at(-1));
  check('Enter on a focused marker clicks it', infoOpen === 'Boston campus', infoOpen);
  await page.keyboard.press('Escape');
  const focusedLabel = await page.evaluate(() =>
    document.activeElement?.getAttribute('aria-label'),
  );
  check(
    'Escape on the pin closes the info window, focus stays on the pin',
    (await page.$('.evm-info')) === null && focusedLabel === 'Boston campus',
    focusedLabel ?? 'none',
  );

  // Zoom buttons.
  await page.click('button[aria-label="Zoom in"]');
  const s1 = await state();
  check('zoom-in button', s1.zoom === 4, `zoom ${s1.zoom}`);
  await page.click('button[aria-label="Zoom out"]');
  check('zoom-out button', (await state()).zoom === 3);

  // Keyboard on the focused map: + / - / arrows.
  await page.focus('.evm-root');
  await page.keyboard.press('+');
  const k1 = await state();
  await page.keyboard.press('-');
  await page.keyboard.press('ArrowRight');
  const k2 = await state();
  check('keyboard + zooms in, - zooms out', k1.zoom === 4 && k2.zoom === 3);
  check(
    'ArrowRight pans east by 100 px',
    Math.abs(k2.lng - s0.lng - (100 / (256 * 8)) * 360) < 1e-6,
    `Δlng ${(k2.lng - s0.lng).toFixed(4)}°`,
  );

  // Drag to pan: moving the pointer 200 px left moves the centre 200 px east.
  await page.mouse.move(640, 400);
  await page.mouse.down();
  for (let i = 1; i <= 10; i++) await page.mouse.move(640 - i * 20, 400, { steps: 1 });
  await page.mouse.up();
  const d1 = await state();
  check(
    'drag pans the map',
    Math.abs(d1.lng - k2.lng - (200 / (256 * 8)) * 360) < 1e-6,
    `Δlng ${(d1.lng - k2.lng).toFixed(4)}°`,
  );
  const clicksAfterDrag = await page.evaluate(
    () => window.__demo.events.filter((e) => e === 'click').length,
  );
  check('the release after a drag is not a map click', clicksAfterDrag === 0);

  // Wheel zoom keeps the point under the pointer in place.
  const frankfurt = { lat: 50.11, lng: 8.68 };
  const before = await page.evaluate((p) => window.__demo.map.pixelFor(p), frankfurt);
  await page.mouse.move(before.x, before.y);
  await page.mouse.wheel(0, -120);
  await page.waitForFunction(() => window.__demo.map.getZoom() === 4);
  const after = await page.evaluate((p) => window.__demo.map.pixelFor(p), frankfurt);
  check(
    'wheel zooms in around the pointer',
    Math.hypot(after.x - before.x, after.y - before.y) < 1.5,
    `moved ${Math.hypot(after.x - before.x, after.y - before.y).toFixed(2)} px`,
  );

  // A plain click on the map background is a map click with a LatLng.
  await page.mouse.click(200, 700);
  const clickCount = await page.evaluate(
    () => window.__demo.events.filter((e) => e === 'click').length,
  );
  check('background click fires the map click event', clickCount === 1);

  if (extraShots) {
    // Views for a person to look at (not checked): whole world, and zooming in on Frankfurt.
    await page.evaluate(() => window.__demo.map.setZoom(1));
    await page.screenshot({ path: '/tmp/maps-standin-z1.png' });
    for (const z of [5, 8, 9, 14, 18]) {
      await page.evaluate((zz) => {
        window.__demo.map.setZoom(zz);
        window.__demo.map.setCenter(zz >= 8 ? { lat: 53.55, lng: 8.1 } : { lat: 50.3, lng: 8.4 });
      }, z);
      await page.screenshot({ path: `/tmp/maps-standin-z${z}.png` });
    }
  }
  check('no page errors', errors.length === 0, errors.join(' | '));

  // The same through the real @angular/google-maps 21.2.9 components.
  const ng = await browser.newPage({ viewport: { width: 1280, height: 800 } });
  const ngErrors = [];
  ng.on('pageerror', (e) => ngErrors.push(String(e)));
  ng.on('console', (m) => m.type() === 'error' && ngErrors.push(m.text()));
  await ng.goto(`${base}/angular.html`);
  await ng.waitForFunction(() => window.__angular?.ready, null, { timeout: 15_000 });
  await ng.waitForSelector('.evm-advanced-content[aria-label="Frankfurt depot"]');
  const ngMarkers = await ng.$$eval('.evm-marker', (els) =>
    els.map((e) => e.getAttribute('aria-label')),
  );
  check(
    '<google-map> with three <map-marker> renders three pins',
    ngMarkers.length === 3,
    ngMarkers.join(', '),
  );
  await ng.click('.evm-marker[aria-label="Los Angeles campus"]');
  await ng.waitForSelector('.evm-info-frame .picked');
  const picked = await ng.textContent('.evm-info-frame .picked');
  check(
    '(mapClick) on <map-marker> opens <map-info-window> with its content',
    picked === 'Los Angeles campus',
    picked ?? '',
  );
  await ng.click('.evm-advanced-content[aria-label="Frankfurt depot"]');
  await ng.waitForFunction(
    () => document.querySelector('.evm-info-frame .picked')?.textContent === 'Frankfurt depot',
  );
  check('(mapClick) on <map-advanced-marker> re-anchors the info window', true);
  await ng.click('button[aria-label="Zoom in"]');
  const ngZoom = await ng.evaluate(() => window.__angular.map.getZoom());
  check('zoom button on the Angular map', ngZoom === 3, `zoom ${ngZoom}`);
  if (extraShots) await ng.screenshot({ path: '/tmp/maps-standin-angular.png' });
  check('no page errors in the Angular harness', ngErrors.length === 0, ngErrors.join(' | '));
} finally {
  await browser.close();
  server.close();
}

console.log(`${passed} passed, ${failed} failed`);
process.exit(failed ? 1 : 0);
