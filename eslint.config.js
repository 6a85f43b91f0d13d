// ESLint for the whole tree (npm run lint; npm test runs it too). typescript-eslint's recommended
// rules everywhere, react-hooks' in web/, and the dependency rules of DEVELOPERS.md as import boundaries.
import { readdirSync } from 'node:fs';
import js from '@eslint/js';
import { defineConfig } from 'eslint/config';
import { builtinRules } from 'eslint/use-at-your-own-risk';
import reactHooks from 'eslint-plugin-react-hooks';
import globals from 'globals';
import tseslint from 'typescript-eslint';

// Each boundary is ESLint's own no-restricted-imports under a name of its own, so that a file under
// several boundaries gets all of them (one rule's options would replace the other's) and a finding
// names the boundary it crosses.
const noRestrictedImports = builtinRules.get('no-restricted-imports');
const boundaryNames = ['shared-stays-pure', 'features-apart', 'web-stays-in-browser', 'server-without-web', 'routes-without-jobs', 'no-test-helpers', 'aliases'];
const boundaries = { rules: Object.fromEntries(boundaryNames.map((name) => [name, noRestrictedImports])) };

const code = '**/*.{ts,tsx}';
const tests = ['**/*.test.{ts,tsx}'];
const features = readdirSync(new URL('./web/src/features', import.meta.url), { withFileTypes: true })
  .filter((d) => d.isDirectory())
  .map((d) => d.name);

/** Node modules that reach disks, processes, networks or the machine. */
const nodeIo = ['fs', 'fs/promises', 'child_process', 'net', 'http', 'https', 'http2', 'tls', 'dgram', 'dns', 'os', 'cluster', 'worker_threads', 'readline', 'process', 'v8', 'vm', 'inspector']
  .flatMap((m) => [m, `node:${m}`]);

export default defineConfig(
  { ignores: ['node_modules/', 'web/dist/', '.data/', 'test-artifacts/'] },
  {
    files: [code, '*.js'],
    extends: [js.configs.recommended, tseslint.configs.recommended],
    languageOptions: { ecmaVersion: 2023, sourceType: 'module', globals: globals.node },
    linterOptions: { reportUnusedDisableDirectives: 'error' },
    rules: {
      // `_name` marks a parameter or element kept for its position.
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrorsIgnorePattern: '^_', ignoreRestSiblings: true }],
      // A type-only import is written `import type`; `typeof import('./x')` stays for modules a test
      // loads itself after setting the environment.
      '@typescript-eslint/consistent-type-imports': ['error', { fixStyle: 'inline-type-imports', disallowTypeAnnotations: false }],
      // An interface that extends one other is how a library's global type is augmented (Express.User).
      '@typescript-eslint/no-empty-object-type': ['error', { allowInterfaces: 'with-single-extends' }],
      eqeqeq: ['error', 'always', { null: 'ignore' }],
    },
  },
  {
    files: ['web/src/**/*.{ts,tsx}'],
    extends: [reactHooks.configs.flat['recommended-latest']],
    languageOptions: { globals: globals.browser },
    rules: {
      // It reports where React Compiler would skip memoising; the app is not built with the compiler.
      'react-hooks/incompatible-library': 'off',
    },
  },
  {
    // vitest reads a fixture's dependencies from its first parameter, which must be an object pattern
    // even when the fixture needs none.
    files: ['tests/**', ...tests],
    rules: { 'no-empty-pattern': ['error', { allowObjectPatternsAsParameters: true }] },
  },

  // ── Import boundaries ────────────────────────────────────────────────────────────────────────
  { plugins: { boundaries } },
  {
    // Leaving a folder goes through an alias (@shared/…, @api/…); only the Drizzle schema keeps
    // relative imports, because drizzle-kit reads it without the aliases.
    files: [code],
    ignores: ['api/db/schema/**'],
    rules: {
      'boundaries/aliases': ['error', { patterns: [{ group: ['../../*'], message: 'Use the path alias (@shared/…, @api/…, @web/…) for an import that leaves its folder.' }] }],
    },
  },
  {
    // Pure computation: runs in the browser and on the server alike.
    files: ['shared/**'],
    rules: {
      'boundaries/shared-stays-pure': [
        'error',
        {
          paths: nodeIo.map((name) => ({ name, message: 'shared/ does no I/O: pass the data in from api/, jobs/ or web/.' })),
          patterns: [
            { group: ['@api/*', '@web/*', '@jobs/*', '@tests/*', '@scripts/*'], message: 'shared/ imports nothing outside shared/: move what it needs into shared/.' },
            { group: ['pg', 'pg-*', 'drizzle-orm', 'drizzle-orm/*', 'express', 'nodemailer', 'smtp-server', 'multer', 'react', 'react-dom', 'react/*', '@tanstack/*'], message: 'shared/ holds no database, server or DOM code.' },
          ],
        },
      ],
    },
  },
  {
    files: ['shared/*.{ts,tsx}'],
    rules: {
      'boundaries/aliases': ['error', { patterns: [{ group: ['../*'], message: 'shared/ imports nothing outside shared/.' }] }],
    },
  },
  {
    // The browser bundle holds no server, job, script or test code.
    files: ['web/src/**'],
    rules: {
      'boundaries/web-stays-in-browser': ['error', { patterns: [{ group: ['@api/*', '@jobs/*', '@scripts/*', '@tests/*'], message: 'web/ imports shared/ and web/ only; the API is reached over HTTP.' }] }],
    },
  },
  {
    // The shared layers of the web app depend on no feature.
    files: ['web/src/components/**', 'web/src/lib/**'],
    rules: {
      'boundaries/features-apart': ['error', { patterns: [{ group: ['@web/features/*', '@web/app/*'], message: 'web/src/components and web/src/lib serve every feature and import none.' }] }],
    },
  },
  // A feature imports another only through web/src/components and web/src/lib; web/src/app may
  // import any feature's routes.
  ...features.map((feature) => ({
    files: [`web/src/features/${feature}/**`],
    rules: {
      'boundaries/features-apart': [
        'error',
        {
          patterns: [
            {
              group: ['@web/features/*', `!@web/features/${feature}`, `!@web/features/${feature}/**`],
              message: 'A feature does not import another feature: move what both use into web/src/lib or web/src/components.',
            },
          ],
        },
      ],
    },
  })),
  {
    files: ['web/src/features/*/*.{ts,tsx}'],
    rules: {
      'boundaries/aliases': ['error', { patterns: [{ group: ['../*'], message: 'A feature does not import another feature: move what both use into web/src/lib or web/src/components.' }] }],
    },
  },
  {
    // The server side reaches the browser app only as the files of web/dist.
    files: ['{api,jobs,scripts}/**'],
    rules: {
      'boundaries/server-without-web': ['error', { patterns: [{ group: ['@web/*'], message: 'api/, jobs/ and scripts/ do not import web/: what both need belongs in shared/.' }] }],
    },
  },
  {
    // A route enqueues through api/spc/queue; the job code runs in the workers.
    files: ['api/routes/**'],
    rules: {
      'boundaries/routes-without-jobs': ['error', { patterns: [{ group: ['@jobs/*'], message: 'Routes do not import jobs/: enqueue through api/spc/queue.' }] }],
    },
  },
  {
    // Production code never imports test helpers. scripts/run-tests.ts is the test runner itself.
    files: ['{api,jobs,shared,web,scripts}/**/*.{ts,tsx}'],
    ignores: [...tests, 'scripts/run-tests.ts'],
    rules: {
      'boundaries/no-test-helpers': [
        'error',
        {
          patterns: [
            { group: ['@tests/*', '**/*.test', '**/*.test.ts', '**/*.test.tsx', '**/testing/*'], message: 'Production code does not import test helpers: they live in tests/support/.' },
            { group: ['vitest', 'vitest/*', 'supertest', 'fast-check', 'playwright-core'], message: 'Production code does not import test tools.' },
          ],
        },
      ],
    },
  },
);
