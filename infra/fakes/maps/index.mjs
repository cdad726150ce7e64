// Node helper for the server: where the built offline maps stand-in is, building it first when
// it is missing or stale. The server serves that file at `GET /maps/api/js` when no maps API key
// is configured, e.g. `res.type('js').sendFile(await mapsStandinPath())`.
//
// Load this module at run time (not bundled into server/dist), since it finds its sources next
// to itself through import.meta.url.
import fs from 'node:fs';
import { build, builtHash, inputsHash, outFile } from './build.mjs';

let pending = null;

/** Whether esbuild can be loaded here (it is a dev dependency). */
async function canBuild() {
  try {
    await import('esbuild');
    return true;
  } catch {
    return false;
  }
}

async function ensureBuilt() {
  const exists = fs.existsSync(outFile);
  if (exists && builtHash() === inputsHash()) return outFile;
  if (!(await canBuild())) {
    // Without esbuild (production install) an existing build is served as it is.
    if (exists) return outFile;
    throw new Error(
      `The offline maps stand-in is not built (${outFile}) and esbuild is not installed: ` +
        'run `node infra/fakes/maps/build.mjs` where dev dependencies are installed.',
    );
  }
  await build();
  return outFile;
}

/**
 * Absolute path of dist/maps-standin.js, built on first call when missing or when its inputs
 * (sources, outline data, package versions) changed since it was built. Later calls in the same
 * process reuse the first result; restart the process to pick up source edits.
 * @returns {Promise<string>}
 */
export function mapsStandinPath() {
  pending ??= ensureBuilt().catch((err) => {
    pending = null; // let a later call try again
    throw err;
  });
  return pending;
}

/** The value of `google.maps.version` in the stand-in, for logs and health checks. */
export const MAPS_STANDIN_VERSION = 'evalon-offline';
