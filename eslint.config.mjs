// Lint: typescript-eslint everywhere, angular-eslint for the web app's code and templates.
import fs from 'node:fs';
import eslint from '@eslint/js';
import angular from 'angular-eslint';
import tseslint from 'typescript-eslint';

// Server components meet only at their front doors (`server/src/<component>/index.ts`): no
// file imports another component's api/, domain/, data-access/ or other internal files, and the
// app's own wiring (app.ts, main.ts, database/, http/, storage/, demo/) imports components the same way.
const serverInfrastructure = new Set(['database', 'http', 'storage', 'types', 'demo']);
const serverComponents = fs
  .readdirSync(new URL('./server/src/', import.meta.url), { withFileTypes: true })
  .filter((e) => e.isDirectory() && !serverInfrastructure.has(e.name))
  .map((e) => e.name);
const frontDoorMessage =
  'Import another server component through its front door (its index.ts), never its internals.';
const internalsOf = (names) =>
  names.flatMap((n) => [`**/${n}/*`, `**/${n}/**/*`, `!**/${n}/index`, `!**/${n}/index.js`]);
const frontDoorRule = (names) => [
  'error',
  { patterns: [{ group: internalsOf(names), message: frontDoorMessage }] },
];
const serverBoundaries = [
  {
    files: ['server/src/**/*.ts'],
    ignores: serverComponents.map((c) => `server/src/${c}/**`),
    rules: { 'no-restricted-imports': frontDoorRule(serverComponents) },
  },
  ...serverComponents.map((c) => ({
    files: [`server/src/${c}/**/*.ts`],
    rules: {
      'no-restricted-imports': frontDoorRule(serverComponents.filter((other) => other !== c)),
    },
  })),
];

export default tseslint.config(
  {
    ignores: ['**/node_modules/**', '**/dist/**', '.data/**', '.angular/**', 'coverage/**'],
  },
  {
    files: ['**/*.ts'],
    extends: [eslint.configs.recommended, ...tseslint.configs.recommended],
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
    },
  },
  {
    files: ['**/*.mjs', '**/*.js'],
    extends: [eslint.configs.recommended],
    languageOptions: {
      globals: {
        process: 'readonly', console: 'readonly', setTimeout: 'readonly', clearTimeout: 'readonly',
        setInterval: 'readonly', clearInterval: 'readonly', Buffer: 'readonly', URL: 'readonly',
        URLSearchParams: 'readonly', fetch: 'readonly', __dirname: 'readonly', require: 'readonly',
        module: 'writable',
      },
    },
  },
  {
    files: ['apps/web/src/**/*.ts'],
    extends: [...angular.configs.tsRecommended],
    processor: angular.processInlineTemplates,
    rules: {
      '@angular-eslint/component-selector': ['error', { type: 'element', prefix: 'ev', style: 'kebab-case' }],
      '@angular-eslint/directive-selector': ['error', { type: 'attribute', prefix: 'ev', style: 'camelCase' }],
      '@angular-eslint/prefer-on-push-component-change-detection': 'error',
    },
  },
  {
    files: ['apps/web/src/**/*.html'],
    extends: [...angular.configs.templateRecommended, ...angular.configs.templateAccessibility],
  },
  ...serverBoundaries,
);
