// One lint setup for the whole repository: typescript-eslint's recommended rules, with
// Prettier owning the formatting (eslint-config-prettier turns off the rules it would fight).
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import prettier from 'eslint-config-prettier';
import globals from 'globals';

export default tseslint.config(
  { ignores: ['**/node_modules/**', '**/dist/**', '.data/**', 'coverage/**', 'test-artifacts/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node } },
    rules: {
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_' },
      ],
      '@typescript-eslint/consistent-type-imports': 'off',
    },
  },
  {
    files: ['dashboard/src/**/*.{ts,tsx}'],
    languageOptions: { globals: { ...globals.browser } },
  },
  // Dashboard imports go one way: app -> features -> shared (components, lib, config).
  {
    files: ['dashboard/src/{components,lib,config}/**/*.{ts,tsx}'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              regex: '(^|/)(features|app)/',
              message: 'Shared code must not import from features or app.',
            },
          ],
        },
      ],
    },
  },
  {
    files: ['dashboard/src/features/**/*.{ts,tsx}'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { regex: '(^|/)app/', message: 'Features must not import from app.' },
            {
              regex: '^\\.\\./\\.\\./(?!\\.\\.)[^/]+/',
              message: 'Features do not import each other; compose them in app/routes.',
            },
          ],
        },
      ],
    },
  },
  prettier,
);
