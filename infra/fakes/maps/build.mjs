// Bundles the offline maps stand-in (src/maps-standin.ts) with the 1:110m country outlines into
// one classic script, dist/maps-standin.js. The output is deterministic: the same inputs give the
// same bytes, and its first line carries a hash of those inputs so that index.mjs can tell when
// it is stale. Run `node infra/fakes/maps/build.mjs` to build and print the size.
import crypto from 'node:crypto';
import fs from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import zlib from 'node:zlib';

const here = path.dirname(fileURLToPath(import.meta.url));
const require = createRequire(import.meta.url);

/** Absolute path of the built script. */
export const outFile = path.join(here, 'dist', 'maps-standin.js');

const BANNER_TAG = 'evalon-offline-maps inputs:';

/** Package files whose content or version decides the output (resolved from this folder). */
function packageInputs() {
  const files = [
    require.resolve('world-atlas/countries-110m.json'),
    require.resolve('world-atlas/package.json'),
    require.resolve('topojson-client/package.json'),
  ];
  // esbuild's version changes its output; if it is not installed, the hash cannot include it,
  // and index.mjs then serves whatever was built before.
  try {
    files.push(require.resolve('esbuild/package.json'));
  } catch {
    // Not installed (a production install without dev dependencies).
  }
  return files;
}

/** Every file that decides the output, in a fixed order. */
export function inputFiles() {
  const src = fs
    .readdirSync(path.join(here, 'src'))
    .filter((f) => f.endsWith('.ts'))
    .sort()
    .map((f) => path.join(here, 'src', f));
  return [path.join(here, 'build.mjs'), ...src, ...packageInputs()];
}

/** SHA-256 over the inputs' names (relative to this folder) and contents. */
export function inputsHash() {
  const hash = crypto.createHash('sha256');
  for (const file of inputFiles()) {
    hash.update(path.relative(here, file).split(path.sep).join('/'));
    hash.update('\0');
    hash.update(fs.readFileSync(file));
    hash.update('\0');
  }
  return hash.digest('hex');
}

/** The inputs hash written in the first line of a built script, or null. */
export function builtHash(file = outFile) {
  let head;
  try {
    const fd = fs.openSync(file, 'r');
    try {
      const buf = Buffer.alloc(256);
      const n = fs.readSync(fd, buf, 0, buf.length, 0);
      head = buf.subarray(0, n).toString('utf8');
    } finally {
      fs.closeSync(fd);
    }
  } catch {
    return null;
  }
  const m = head.match(new RegExp(`${BANNER_TAG} ([0-9a-f]{64})`));
  return m ? m[1] : null;
}

// Keeps only what the base map draws from the TopoJSON: the arcs, the quantisation transform and
// the two geometry collections without country names or ids (about 10 kB less).
const slimCountries = {
  name: 'slim-countries',
  setup(build) {
    build.onLoad({ filter: /world-atlas[\\/]countries-110m\.json$/ }, async (args) => {
      const topo = JSON.parse(await fs.promises.readFile(args.path, 'utf8'));
      const strip = (collection) => ({
        type: collection.type,
        geometries: collection.geometries.map((g) => ({ type: g.type, arcs: g.arcs })),
      });
      const slim = {
        type: topo.type,
        transform: topo.transform,
        arcs: topo.arcs,
        objects: { countries: strip(topo.objects.countries), land: strip(topo.objects.land) },
      };
      return { contents: JSON.stringify(slim), loader: 'json' };
    });
  },
};

function licenceNotices() {
  // The ISC licences of the two bundled packages ask for their notices in every copy, so the
  // generated file carries them verbatim from the installed packages.
  const notice = (pkg) => {
    const text = fs.readFileSync(require.resolve(`${pkg}/LICENSE`), 'utf8').trim();
    return `${pkg} licence:\n${text.replace(/\*\//g, '* /')}`;
  };
  return `/*\n${notice('topojson-client')}\n\n${notice('world-atlas')}\n*/\n`;
}

/**
 * Builds dist/maps-standin.js (written through a temporary file and a rename, so a concurrent
 * reader never sees half a file). Returns the path, the raw and gzip sizes and the inputs hash.
 */
export async function build() {
  const esbuild = await import('esbuild');
  const hash = inputsHash();
  const banner =
    `/*! ${BANNER_TAG} ${hash} */\n` +
    '/*! Evalon offline stand-in for the maps JavaScript API subset used by @angular/google-maps.\n' +
    ' * Country outlines: Natural Earth 1:110m Admin 0 (version 4.1.0, public domain),\n' +
    ' * as TopoJSON from the world-atlas package; decoded with topojson-client. */';
  const result = await esbuild.build({
    absWorkingDir: here,
    entryPoints: [path.join(here, 'src', 'maps-standin.ts')],
    bundle: true,
    format: 'iife',
    platform: 'browser',
    target: ['es2022'],
    minify: true,
    legalComments: 'none',
    charset: 'utf8',
    write: false,
    logLevel: 'warning',
    tsconfig: path.join(here, 'tsconfig.json'),
    banner: { js: banner },
    footer: { js: licenceNotices() },
    plugins: [slimCountries],
  });
  const code = result.outputFiles[0].contents;
  fs.mkdirSync(path.dirname(outFile), { recursive: true });
  const tmp = `${outFile}.${process.pid}.${Date.now()}.tmp`;
  fs.writeFileSync(tmp, code);
  fs.renameSync(tmp, outFile);
  return { path: outFile, bytes: code.length, gzipBytes: zlib.gzipSync(code).length, hash };
}

if (process.argv[1] && import.meta.url === pathToFileURL(path.resolve(process.argv[1])).href) {
  const r = await build();
  const kb = (n) => `${(n / 1024).toFixed(1)} KiB`;
  console.log(
    `built ${path.relative(process.cwd(), r.path)}: ${r.bytes} bytes (${kb(r.bytes)}), ` +
      `gzip ${r.gzipBytes} bytes (${kb(r.gzipBytes)}), inputs ${r.hash.slice(0, 12)}`,
  );
}
