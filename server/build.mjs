// Bundles the server's entry points with esbuild. Our own workspace packages (@evalon/*) are
// TypeScript sources, so they are bundled in; every other dependency stays in node_modules.
import * as esbuild from 'esbuild';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));

const externalDeps = {
  name: 'external-deps',
  setup(build) {
    build.onResolve({ filter: /^[^./]/ }, (args) => {
      if (args.path.startsWith('@evalon/')) return undefined;
      return { path: args.path, external: true };
    });
  },
};

await esbuild.build({
  absWorkingDir: here,
  entryPoints: {
    main: 'src/main.ts',
    migrate: 'src/database/migrate.ts',
    demo: 'src/demo/cli.ts',
  },
  outdir: 'dist',
  bundle: true,
  platform: 'node',
  target: 'node20',
  format: 'cjs',
  sourcemap: true,
  logLevel: 'warning',
  tsconfig: path.join(here, 'tsconfig.json'),
  plugins: [externalDeps],
});
