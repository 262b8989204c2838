// ESLint flat config: JavaScript and TypeScript recommended rules (not type-checked, for speed: `tsc
// --noEmit` does the type checking), the rules of hooks for the React client, and the right globals for
// browser, Node and test code.
import js from '@eslint/js';
import reactHooks from 'eslint-plugin-react-hooks';
import { defineConfig, globalIgnores } from 'eslint/config';
import globals from 'globals';
import tseslint from 'typescript-eslint';

export default defineConfig([
  globalIgnores([
    'dist/**',
    'node_modules/**',
    '.data/**',
    'tests/artifacts/**',
    'test-results/**',
    'playwright-report/**',
    'out/**',
    'coverage/**',
  ]),
  js.configs.recommended,
  tseslint.configs.recommended,
  {
    languageOptions: { ecmaVersion: 2023, sourceType: 'module', globals: { ...globals.node } },
    linterOptions: { reportUnusedDisableDirectives: 'error' },
    rules: {
      // `_name` marks an argument or binding kept on purpose (an Express error handler's `next`, a tuple slot).
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrorsIgnorePattern: '^_', ignoreRestSiblings: true },
      ],
    },
  },
  {
    // tsc's definite-assignment check makes `let best = 0;` before a loop that always assigns it mandatory,
    // while this rule calls that first value useless: the two disagree, and the compiler wins.
    files: ['**/*.{ts,tsx,mts,cts}'],
    rules: { 'no-useless-assignment': 'off' },
  },
  {
    // The client runs in the browser.
    files: ['app/**/*.{ts,tsx,js,jsx}'],
    languageOptions: { globals: { ...globals.browser } },
    // The plugin's recommended set: the rules of hooks plus the React Compiler's checks (purity, refs, state in effects).
    ...reactHooks.configs.flat.recommended,
  },
  {
    // The numerical core is shared by browser and Node: only what both have. No node:* module, no
    // Node-only global (tsconfig.geometry.json, run by `npm run typecheck`, checks the same without
    // Node's types); worker threads and files are the server's (server/workers/, server/cli/).
    files: ['geometry/**/*.ts'],
    languageOptions: { globals: { ...globals['shared-node-browser'] } },
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: ['node:*'], message: 'geometry/ runs in the browser too: Node modules belong in server/.' },
            { group: ['fs', 'fs/*', 'path', 'url', 'os', 'worker_threads', 'child_process', 'crypto', 'zlib', 'util', 'stream', 'events', 'buffer', 'piscina'], message: 'geometry/ runs in the browser too: Node modules belong in server/.' },
          ],
        },
      ],
      'no-restricted-globals': [
        'error',
        ...['process', 'Buffer', '__dirname', '__filename', 'require', 'global', 'setImmediate'].map((name) => ({ name, message: 'geometry/ runs in the browser too: no Node globals.' })),
      ],
    },
  },
  {
    // Tests feed deliberately malformed values to typed APIs (`doc as any`, `Record<string, any>` fixtures
    // mutated field by field); there `any` is the point, so it is shown as a warning rather than failing.
    files: ['tests/**/*.{ts,tsx}'],
    rules: { '@typescript-eslint/no-explicit-any': 'warn' },
  },
  {
    // Playwright specs touch the page's `window` and `document` inside page.evaluate callbacks.
    files: ['tests/e2e/**/*.ts', 'tests/app/**/*.{ts,tsx}'],
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
  },
]);
