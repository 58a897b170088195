// ESLint flat config: `npm run lint` (run by `npm test` before the tests). The conventions these
// rules keep are listed in DEVELOPERS.md, "Lint and type checks".
import js from '@eslint/js';
import comments from '@eslint-community/eslint-plugin-eslint-comments/configs';
import angular from 'angular-eslint';
import { createTypeScriptImportResolver } from 'eslint-import-resolver-typescript';
import { importX } from 'eslint-plugin-import-x';
import jest from 'eslint-plugin-jest';
import globals from 'globals';
import tseslint from 'typescript-eslint';

const tsFiles = ['**/*.ts'];
const specFiles = ['spec/**/*.ts', 'src/**/*.spec.ts', 'src/app/*/testing/**/*.ts'];

export default tseslint.config(
  { ignores: ['dist/**', '.angular/**', '.data/**', '.test-results/**', 'coverage/**', 'node_modules/**'] },
  { linterOptions: { reportUnusedDisableDirectives: 'error' } },

  // Every disable comment names its rule and its reason (`-- why`), and never a whole file's rules.
  comments.recommended,
  {
    rules: {
      '@eslint-community/eslint-comments/require-description': ['error', { ignore: [] }],
      '@eslint-community/eslint-comments/no-unlimited-disable': 'error',
      '@eslint-community/eslint-comments/disable-enable-pair': ['error', { allowWholeFile: false }],
    },
  },

  // Plain JavaScript: the ops scripts, jest configs and the solver worker threads.
  {
    files: ['**/*.js', '**/*.mjs', '**/*.cjs'],
    extends: [js.configs.recommended],
    languageOptions: { globals: { ...globals.node } },
  },
  { files: ['**/*.js'], languageOptions: { sourceType: 'commonjs' } },

  // TypeScript everywhere, with type information from the TypeScript project service (tsconfig.json
  // names the projects that hold server, client and specs). recommendedTypeChecked, not
  // strictTypeChecked: on this code the strict set adds some 280 findings that are mostly style
  // (void expressions in arrow bodies, `!` in tests) or need a judgement per line
  // (no-unnecessary-condition); move up when those are worked through.
  {
    files: tsFiles,
    extends: [js.configs.recommended, ...tseslint.configs.recommendedTypeChecked],
    languageOptions: {
      parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname },
    },
    rules: {
      // Callback APIs (passport, express-session) hand over their errors as unknown: passed on as they are.
      '@typescript-eslint/prefer-promise-reject-errors': ['error', { allowThrowingUnknown: true, allowThrowingAny: true }],
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none' }],
    },
  },

  // Import cycles fail the lint, through the `@shared/*` alias too.
  {
    files: [...tsFiles, '**/*.mjs'],
    plugins: { 'import-x': importX },
    settings: {
      // Without these, import-x reads a .ts dependency with the JavaScript parser, sees no imports,
      // and finds no cycle.
      'import-x/extensions': importX.flatConfigs.typescript.settings['import-x/extensions'],
      'import-x/parsers': importX.flatConfigs.typescript.settings['import-x/parsers'],
      'import-x/resolver-next': [
        createTypeScriptImportResolver({ project: 'tsconfig.json' }),
      ],
    },
    rules: {
      'import-x/no-cycle': ['error', { ignoreExternal: true }],
    },
  },

  // Routes and services get what they need from server/context.ts; app.ts imports them, so they
  // never import app.ts.
  {
    files: ['server/routes/**/*.ts', 'server/services/**/*.ts', 'server/http/**/*.ts'],
    rules: {
      'no-restricted-imports': ['error', { patterns: [{
        regex: '^\\.\\./(\\.\\./)*app$',
        message: 'Import AppDeps and the shared limits from server/context.ts; app.ts imports the routes.',
      }] }],
    },
  },

  // Every environment variable is read and validated in server/config.ts (loadConfig, setting):
  // a misspelt or malformed one fails at start with its name, and the list of them is one file.
  {
    files: ['server/**/*.ts', 'shared/**/*.ts', 'src/**/*.ts', 'seeds/**/*.ts'],
    ignores: ['server/config.ts', 'server/bench/**'],
    rules: {
      'no-restricted-properties': ['error', {
        object: 'process', property: 'env',
        message: 'Read environment variables in server/config.ts (loadConfig or setting()), nowhere else.',
      }],
    },
  },

  // SQL of our own lives in query modules (`*.queries.ts`: server/services/queries/, or beside the
  // store of the auth/http layer and the seed script), each statement a named function with its row
  // type. Elsewhere no statement is run and no SQL text is written. Migrations and benchmarks
  // (which seed with plain SQL) are their own places.
  {
    files: ['server/**/*.ts', 'shared/**/*.ts', 'seeds/**/*.ts'],
    ignores: ['server/**/*.queries.ts', 'server/migrations/**', 'server/bench/**'],
    rules: {
      'no-restricted-syntax': ['error', {
        selector: 'CallExpression[callee.property.name=/^(execute|query|raw|getKnex|createQueryBuilder)$/]',
        message: 'Run SQL through a function of a query module (server/services/queries/*.queries.ts or a *.queries.ts beside the store).',
      }, {
        selector: 'Literal[value=/^\\s*(select\\s[\\s\\S]*\\sfrom\\s|insert\\s+into\\s|update\\s+\\w+\\s+set\\s|delete\\s+from\\s|with\\s+\\w+\\s+as\\s*\\()/]',
        message: 'SQL text belongs in a query module (*.queries.ts), with its row type.',
      }, {
        selector: 'TemplateElement[value.raw=/^\\s*(select\\s[\\s\\S]*\\sfrom\\s|insert\\s+into\\s|update\\s+\\w+\\s+set\\s|delete\\s+from\\s|with\\s+\\w+\\s+as\\s*\\()/]',
        message: 'SQL text belongs in a query module (*.queries.ts), with its row type.',
      }],
    },
  },

  // MikroORM's generated migrations: up() and down() are async by its Migration API, whether they
  // await or not.
  { files: ['server/migrations/*.ts'], rules: { '@typescript-eslint/require-await': 'off' } },

  // Angular: components, directives and their templates (inline ones too), with the template
  // accessibility rules.
  {
    files: ['src/**/*.ts'],
    extends: [...angular.configs.tsRecommended],
    processor: angular.processInlineTemplates,
    rules: {
      '@angular-eslint/component-selector': ['error', { type: 'element', prefix: 'app', style: 'kebab-case' }],
      '@angular-eslint/directive-selector': ['error', { type: 'attribute', prefix: 'app', style: 'camelCase' }],
    },
  },
  {
    files: ['src/**/*.html'],
    extends: [...angular.configs.templateRecommended, ...angular.configs.templateAccessibility],
  },

  // Tests: every test asserts, has a title that says what it checks, and waits for a condition
  // rather than a fixed time.
  {
    files: specFiles,
    extends: [jest.configs['flat/recommended']],
    rules: {
      'jest/no-disabled-tests': 'error',
      'jest/no-focused-tests': 'error',
      'jest/valid-title': 'error',
      'jest/expect-expect': ['error', { assertFunctionNames: ['expect', 'expect*', '*.expect*'] }],
      // A set-up step may assert its own preconditions (a failed upload fails every test of the file).
      'jest/no-standalone-expect': ['error', { additionalTestBlockFunctions: ['beforeAll', 'beforeEach'] }],
      'no-restricted-properties': ['error', {
        property: 'waitForTimeout',
        message: 'A browser test waits for a condition (a locator, waitForFunction, expect.poll), never a fixed time.',
      }],
      // A pause outside a polling loop is a sleep; inside one (poll, pause, poll again) it is how
      // waiting for a condition looks, as in waitFor() (spec/support/wait.ts).
      'no-restricted-syntax': ['error', {
        selector: 'NewExpression[callee.name="Promise"]:not(:matches(ForStatement, WhileStatement, DoWhileStatement) *) CallExpression[callee.name="setTimeout"]',
        message: 'No sleeps in tests: wait for a condition with waitFor() (spec/support/wait.ts), drain the queue, or use a hook.',
      }],
      // The tests that branch over outcomes no one can fix in advance (property-based and cross-engine
      // checks, a race's accepted and refused answers) assert in each branch and count the branches.
      'jest/no-conditional-expect': 'off',
      // Tests read untyped JSON answers (supertest's body is `any`): checking them is the test's job.
      '@typescript-eslint/no-unsafe-member-access': 'off',
      '@typescript-eslint/no-unsafe-assignment': 'off',
      '@typescript-eslint/no-unsafe-argument': 'off',
      '@typescript-eslint/no-unsafe-call': 'off',
      '@typescript-eslint/no-unsafe-return': 'off',
    },
  },
);
