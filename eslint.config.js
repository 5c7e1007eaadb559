// Coilpath's lint: `npm run lint`. typescript-eslint's recommended rules (syntax only, no type information,
// to stay fast), the React hooks rules for the web, and the layers (DEVELOPERS.md, "Layers"):
//   web  app → features → components → lib     (a feature never imports another feature)
//   api  lib never imports modules; routes → service → repo: a route never imports a repo or another route
//        file; only routes (and the app) use the HTTP side of auth (middleware, cookies): the rest asks
//        auth/policy.ts
// A rule is turned off only with a one-line reason beside it.
import { fileURLToPath } from 'node:url';
import js from '@eslint/js';
import { defineConfig } from 'eslint/config';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';
import boundaries from 'eslint-plugin-boundaries';

const resolver = fileURLToPath(new URL('./eslint.resolver.cjs', import.meta.url));

/**
 * API modules whose services and routes hold no query: their SQL is in `<area>.repo.ts` (routes → service → repo).
 * alarm-sources is not listed yet: its service still takes a table's type from the schema.
 */
const layeredModules = [
  'agreements',
  'auth',
  'branches',
  'day',
  'events',
  'fix-quality',
  'health',
  'outbox',
  'sites',
  'team',
  'unit-file',
  'units',
  'visits',
  'work-orders',
];
const noQueries = {
  group: ['drizzle-orm', 'drizzle-orm/*', '**/db/schema'],
  message: "a service or route never queries: Drizzle and the schema's tables belong to the module's <area>.repo.ts",
};

export default defineConfig(
  {
    ignores: [
      '**/node_modules/**',
      '**/dist/**',
      '**/coverage/**',
      'apps/api/src/db/migrations/**',
      'data/**',
      'bench/**',
      'test-results/**',
      'tests/e2e/artifacts/**',
      '.vr.json',
    ],
  },
  js.configs.recommended,
  tseslint.configs.recommended,
  {
    files: ['**/*.{ts,tsx}'],
    rules: {
      // Names starting with `_` are kept on purpose (a required parameter the body does not use).
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none', ignoreRestSiblings: true },
      ],
      // Uploaded text is checked for control characters on purpose (to refuse binary files as CSV).
      'no-control-regex': 'off',
    },
  },
  {
    files: ['*.js', '*.cjs'],
    languageOptions: { globals: { require: 'readonly', module: 'writable', __dirname: 'readonly', URL: 'readonly' } },
    rules: {
      // The import resolver is a CommonJS file: eslint-module-utils loads resolvers with require().
      '@typescript-eslint/no-require-imports': 'off',
    },
  },
  {
    files: ['apps/web/src/**/*.{ts,tsx}'],
    ...reactHooks.configs.flat.recommended,
    rules: {
      ...reactHooks.configs.flat.recommended.rules,
      'react-hooks/exhaustive-deps': 'error',
      // react-hook-form's watch() is used knowingly; Coilpath does not build with the React Compiler.
      'react-hooks/incompatible-library': 'off',
    },
  },
  {
    files: ['apps/web/src/**/*.{ts,tsx}', 'apps/api/src/**/*.ts'],
    // Tests may reach any floor to set up what they check; the layers bind the product's code.
    ignores: ['**/*.test.{ts,tsx}'],
    plugins: { boundaries },
    settings: {
      'import/resolver': { [resolver]: {} },
      // Static imports, re-exports and import(): a lazily loaded page crosses a floor like any import.
      'boundaries/dependency-nodes': ['import', 'export', 'dynamic-import'],
      'boundaries/elements': [
        { type: 'web-app', pattern: 'apps/web/src/app' },
        { type: 'web-feature', pattern: 'apps/web/src/features/*', capture: ['feature'] },
        { type: 'web-components', pattern: 'apps/web/src/components' },
        { type: 'web-lib', pattern: 'apps/web/src/lib' },
        { type: 'api-lib', pattern: 'apps/api/src/lib' },
        { type: 'api-modules', pattern: 'apps/api/src/modules' },
      ],
    },
    rules: {
      'boundaries/dependencies': [
        'error',
        {
          default: 'allow',
          policies: [
            {
              from: { element: { types: { anyOf: ['web-lib', 'web-components'] } } },
              disallow: { to: { element: { types: { anyOf: ['web-feature', 'web-app'] } } } },
              message: 'lib/ and components/ are the bottom floors of the web: they never import features/ or app/',
            },
            {
              from: { element: { type: 'web-feature' } },
              disallow: { to: { element: { type: 'web-app' } } },
              message: 'app/ is the top floor: a feature takes session, branch and screens from lib/',
            },
            {
              from: { element: { type: 'web-feature' } },
              disallow: { to: { element: { type: 'web-feature', captured: { feature: '!{{ from.element.captured.feature }}' } } } },
              message: 'a feature never imports another feature: move what both need to components/ or lib/',
            },
            {
              from: { element: { type: 'api-lib' } },
              disallow: { to: { element: { type: 'api-modules' } } },
              message: 'apps/api/src/lib is below the modules: it never imports modules/',
            },
          ],
        },
      ],
    },
  },
  {
    // API layers inside a module (DEVELOPERS.md, "Layers"). Files, not folders, so plain import patterns:
    // eslint-plugin-boundaries classifies folders.
    files: ['apps/api/src/modules/**/*.ts'],
    ignores: ['**/*.test.ts', 'apps/api/src/modules/*/*.routes.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['**/auth/middleware', '**/auth/cookies'],
              message:
                'services, repos and presenters never reach HTTP: who may act is auth/policy.ts; middleware and cookies belong to routes',
            },
            {
              group: ['**/*.routes'],
              message: 'a service never imports a route file: move what both need down (a service, a repo, or auth/)',
            },
          ],
        },
      ],
    },
  },
  {
    files: ['apps/api/src/modules/*/*.routes.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: ['**/*.repo'], message: 'a route calls its service, never a repo (routes → service → repo)' },
            {
              group: ['**/*.routes'],
              message: 'a route file never imports another route file: move what both need down (auth/cookies.ts, a service)',
            },
          ],
        },
      ],
    },
  },
  {
    // Modules split into routes → service → repo (DEVELOPERS.md, "Layers"): their services and routes never
    // query the database themselves. A module joins this list once its *.service.ts and *.routes.ts are clean.
    files: layeredModules.map((m) => `apps/api/src/modules/${m}/*.service.ts`),
    ignores: ['**/*.test.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['**/auth/middleware', '**/auth/cookies'],
              message:
                'services, repos and presenters never reach HTTP: who may act is auth/policy.ts; middleware and cookies belong to routes',
            },
            {
              group: ['**/*.routes'],
              message: 'a service never imports a route file: move what both need down (a service, a repo, or auth/)',
            },
            noQueries,
          ],
        },
      ],
    },
  },
  {
    files: layeredModules.map((m) => `apps/api/src/modules/${m}/*.routes.ts`),
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: ['**/*.repo'], message: 'a route calls its service, never a repo (routes → service → repo)' },
            {
              group: ['**/*.routes'],
              message: 'a route file never imports another route file: move what both need down (auth/cookies.ts, a service)',
            },
            noQueries,
          ],
        },
      ],
    },
  },
  {
    // The helpers of split modules that held queries before: they never import Drizzle or the schema's tables
    // either. Left out: `sites/list-query.ts` (the list helpers every repo builds its WHERE and ORDER BY with),
    // `visits/visits.present.ts` (schema row types only), `visits/visits.fixtures.ts` (tests' data).
    // `@typescript-eslint/no-restricted-imports` so the core rule's patterns above still apply.
    files: [
      'apps/api/src/modules/visits/{access,signature}.ts',
      'apps/api/src/modules/unit-file/refrigerant-record.ts',
      'apps/api/src/modules/units/units-import.ts',
      'apps/api/src/modules/sites/history.ts',
      'apps/api/src/modules/events/actor.ts',
    ],
    rules: {
      '@typescript-eslint/no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['drizzle-orm', 'drizzle-orm/*', '**/db/schema'],
              message: "SQL lives in the module's <area>.repo.ts (routes → service → repo): call a repo function instead",
            },
          ],
        },
      ],
    },
  },
);
