// ESLint for the whole repository (`npm run lint`; `npm test` and CI run it before the suites).
// typescript-eslint's recommended rules everywhere, angular-eslint's (code, templates and the
// accessibility rules of templates) in apps/web, and the house conventions on top.
// Formatting is Prettier's alone: eslint-config-prettier comes last and turns off every rule
// that could disagree with it.
// A rule is switched off only for an area where it is wrong there (with the reason beside it);
// a single line is excused with `// eslint-disable-next-line rule-name -- the reason`.
import comments from '@eslint-community/eslint-plugin-eslint-comments/configs';
import js from '@eslint/js';
import angular from 'angular-eslint';
import prettier from 'eslint-config-prettier';
import { defineConfig, globalIgnores } from 'eslint/config';
import globals from 'globals';
import tseslint from 'typescript-eslint';

export default defineConfig(
  globalIgnores([
    '**/dist/',
    '**/build/',
    '**/.angular/',
    '**/node_modules/',
    'drizzle/',
    '**/test-results/',
    '**/playwright-report/',
    '**/.test-data/',
    '**/.data/',
  ]),
  {
    linterOptions: { reportUnusedDisableDirectives: 'error' },
  },
  {
    // Every disable names its rules and says why (`-- the reason`).
    extends: [comments.recommended],
    rules: {
      '@eslint-community/eslint-comments/require-description': 'error',
      '@eslint-community/eslint-comments/no-unlimited-disable': 'error',
      // A file-wide disable at the top (with its reason) is fine: that file is the exception.
      '@eslint-community/eslint-comments/disable-enable-pair': ['error', { allowWholeFile: true }],
    },
  },
  {
    files: ['**/*.{ts,js,mjs}'],
    extends: [js.configs.recommended, tseslint.configs.recommended],
    languageOptions: { ecmaVersion: 2023, sourceType: 'module' },
    rules: {
      // Unused names are errors, except a leading underscore (a parameter kept for its position)
      // and the rest siblings of a destructuring that drops a property on purpose.
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none', ignoreRestSiblings: true },
      ],
    },
  },
  {
    // Scripts and workers that Node runs as they are.
    files: ['**/*.{js,mjs}', 'tools/**/*.ts', 'e2e/**/*.ts', 'apps/api/**/*.ts', 'libs/**/*.ts', '*.ts'],
    languageOptions: { globals: globals.node },
  },
  {
    // One clock: nothing reads the machine's time but the API's `deps.clock` (apps/api/src/time/clock.ts)
    // and the web app's `Clock` (apps/web/src/app/core/clock.ts); everything else is handed `now`.
    // The browser tests stand at Playwright's clock, so they are held to it too.
    files: ['apps/**/*.{ts,mjs}', 'libs/**/*.ts', 'tools/**/*.{ts,mjs}', 'e2e/**/*.ts'],
    rules: {
      'no-restricted-syntax': [
        'error',
        {
          selector: "NewExpression[callee.name='Date'][arguments.length=0]",
          message: 'Read the time from the clock (deps.clock / Clock / the `now` handed in), not from the machine.',
        },
        {
          selector: "CallExpression[callee.object.name='Date'][callee.property.name='now']",
          message: 'Read the time from the clock (deps.clock / Clock / the `now` handed in), not from the machine.',
        },
      ],
    },
  },
  {
    // The API logs through pino (`createLogger`, apps/api/src/logging.ts): console output would
    // bypass its redaction and its levels.
    files: ['apps/api/**/*.{ts,mjs}'],
    rules: { 'no-console': 'error' },
  },
  {
    files: ['apps/web/**/*.ts'],
    extends: [angular.configs.tsRecommended],
    processor: angular.processInlineTemplates,
    languageOptions: { globals: globals.browser },
    rules: {
      // Our components carry no suffix (`plans-page.ts` holds `PlansPage`), so the suffix rules
      // stay off; the selectors carry the `ny` prefix.
      '@angular-eslint/component-class-suffix': 'off',
      '@angular-eslint/directive-class-suffix': 'off',
      '@angular-eslint/component-selector': ['error', { type: 'element', prefix: 'ny', style: 'kebab-case' }],
      '@angular-eslint/directive-selector': ['error', { type: 'attribute', prefix: 'ny', style: 'camelCase' }],
      '@angular-eslint/prefer-on-push-component-change-detection': 'error',
      '@angular-eslint/prefer-signals': 'error',
      '@angular-eslint/prefer-output-emitter-ref': 'error',
      '@angular-eslint/prefer-host-metadata-property': 'error',
      '@angular-eslint/prefer-inject': 'error',
      '@angular-eslint/prefer-standalone': 'error',
      // Classes go through `[class.x]` bindings and styles through `[style.x]`, never NgClass/NgStyle.
      'no-restricted-imports': [
        'error',
        {
          paths: [
            {
              name: '@angular/common',
              importNames: ['NgClass', 'NgStyle', 'NgIf', 'NgFor', 'NgSwitch', 'NgSwitchCase', 'NgSwitchDefault'],
              message: 'Use [class.x] / [style.x] bindings and @if / @for / @switch instead.',
            },
          ],
        },
      ],
    },
  },
  {
    files: ['apps/web/**/*.html'],
    extends: [angular.configs.templateRecommended, angular.configs.templateAccessibility],
    rules: {
      '@angular-eslint/template/prefer-control-flow': 'error',
      // `[ngClass]` has a rule of its own; `[ngStyle]` is caught by no-restricted-imports above.
      '@angular-eslint/template/prefer-class-binding': 'error',
    },
  },
  {
    // Tools, browser tests and benchmarks are command-line programs: printing is their output.
    files: ['tools/**', 'e2e/**'],
    rules: { 'no-console': 'off' },
  },
  prettier,
);
