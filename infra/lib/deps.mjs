// Makes sure node_modules matches package-lock.json, and that Debian's Chromium is there for
// browser tests. Both are idempotent and fast when nothing is missing.
import fs from 'node:fs';
import path from 'node:path';
import { log, root, run } from './proc.mjs';

/** Runs `npm ci` when node_modules is missing or older than package-lock.json. */
export function ensureNodeModules() {
  const marker = path.join(root, 'node_modules', '.package-lock.json');
  const lock = path.join(root, 'package-lock.json');
  const stale =
    !fs.existsSync(marker) || fs.statSync(lock).mtimeMs > fs.statSync(marker).mtimeMs + 1000;
  if (!stale) return;
  log('installing dependencies (npm ci)');
  run('npm', ['ci', '--no-audit', '--no-fund', '--loglevel=error']);
}

/** Installs Debian's chromium when /usr/bin/chromium is missing (CI and sessions are root). */
export function ensureChromium() {
  if (fs.existsSync('/usr/bin/chromium')) return;
  log("Chromium is not installed: installing Debian's chromium package");
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  run('apt-get', ['update', '-qq'], { env });
  run('apt-get', ['install', '-y', '-qq', 'chromium'], { env });
}

/**
 * Installs Debian's poppler-utils when `pdftoppm` is missing: the browser tests render the
 * evaluation report's PDF pages to PNG with it to see that the charts are drawn.
 */
export function ensurePdfRenderer() {
  if (fs.existsSync('/usr/bin/pdftoppm')) return;
  log("pdftoppm is not installed: installing Debian's poppler-utils package");
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  run('apt-get', ['update', '-qq'], { env });
  run('apt-get', ['install', '-y', '-qq', 'poppler-utils'], { env });
}

/** Newest modification time of any file under the given folders (skips node_modules). */
export function newestMtime(dirs) {
  let newest = 0;
  const walk = (d) => {
    let entries;
    try {
      entries = fs.readdirSync(d, { withFileTypes: true });
    } catch {
      return;
    }
    for (const e of entries) {
      if (e.name === 'node_modules' || e.name === 'dist') continue;
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else newest = Math.max(newest, fs.statSync(p).mtimeMs);
    }
  };
  for (const d of dirs) walk(path.join(root, d));
  return newest;
}

/** Builds the Angular app when its output is missing or older than its sources. */
export function ensureWebBuild({ force = false } = {}) {
  const index = path.join(root, 'dist/web/browser/index.html');
  const sources = newestMtime(['apps/web', 'packages', 'angular.json']);
  if (!force && fs.existsSync(index) && fs.statSync(index).mtimeMs > sources) return;
  log('building the web app (ng build)');
  run(process.execPath, [path.join(root, 'node_modules/@angular/cli/bin/ng.js'), 'build', 'web'], {
    env: { ...process.env, NG_CLI_ANALYTICS: 'false' },
  });
}

/** Bundles the server with esbuild (about a second). */
export function buildServer() {
  run(process.execPath, [path.join(root, 'server/build.mjs')]);
}
