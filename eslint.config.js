// Lint rules: typescript-eslint strict, a circular-import check, and the pure-core boundary
// (src/{model,formats,spectra,decay,photophysics,analysis,qc} may not touch I/O, clock or edges).
// TypeScript files are linted with type information (the project service reads tsconfig.json) so that
// a type assertion that asserts nothing is an error; JavaScript files are linted without it.
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import { importX } from 'eslint-plugin-import-x';
import { createTypeScriptImportResolver } from 'eslint-import-resolver-typescript';

const pureCore = ['model', 'formats', 'spectra', 'decay', 'photophysics', 'analysis', 'qc'];
const edges = ['store', 'pipeline', 'queue', 'output', 'server', 'config', 'cli', 'demo'];

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', 'coverage/**', 'bench/out/**', 'test/reference/**/*.py'] },
  js.configs.recommended,
  ...tseslint.configs.strict,
  {
    languageOptions: {
      globals: { process: 'readonly', console: 'readonly', URL: 'readonly' },
      parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname },
    },
    plugins: { 'import-x': importX },
    settings: {
      'import-x/resolver-next': [createTypeScriptImportResolver({ project: './tsconfig.json' })],
    },
    rules: {
      'import-x/no-cycle': ['error', { maxDepth: Infinity, ignoreExternal: true }],
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/no-explicit-any': 'error',
      '@typescript-eslint/no-non-null-assertion': 'error',
      '@typescript-eslint/no-unnecessary-type-assertion': 'error',
      'no-eval': 'error',
      'no-new-func': 'error',
    },
  },
  {
    files: pureCore.map((dir) => `src/${dir}/**/*.ts`),
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: [
                'node:*',
                '!node:crypto',
                'fs',
                'fs/*',
                'path',
                'os',
                'child_process',
                'worker_threads',
                'net',
                'http',
                'https',
              ],
              message:
                'The computing core is pure: no file system, network, process or clock. Move I/O to an edge module.',
            },
            {
              group: edges.flatMap((dir) => [`../${dir}/*`, `../../${dir}/*`]),
              message:
                'The computing core may not import edge modules (store, pipeline, queue, output, server, config, cli, demo).',
            },
          ],
        },
      ],
      'no-restricted-globals': [
        'error',
        { name: 'Date', message: 'The core has no clock: pass times in as values.' },
        { name: 'process', message: 'The core reads no environment.' },
        { name: 'fetch', message: 'The core does no network I/O.' },
      ],
      'no-restricted-properties': [
        'error',
        { object: 'Math', property: 'random', message: 'Use a seeded generator passed in as a parameter.' },
      ],
    },
  },
  {
    // SQL lives in src/store/ behind typed queries: no other module reaches the ledger's database or statements.
    files: ['src/**/*.ts'],
    ignores: ['src/store/**'],
    rules: {
      'no-restricted-syntax': [
        'error',
        {
          selector: "MemberExpression[property.name='database'], MemberExpression[property.name='prepare']",
          message: 'SQL belongs in src/store/: add or use a typed query there.',
        },
      ],
    },
  },
  {
    files: ['**/*.js', '**/*.mjs'],
    ...tseslint.configs.disableTypeChecked,
  },
);
