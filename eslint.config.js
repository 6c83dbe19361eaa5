// ESLint (flat config): typescript-eslint's recommended rules, React's rules of hooks, and the import
// rules the project relies on (DEVELOPERS.md, Conventions). Formatting is Prettier's job
// (eslint-config-prettier turns off the rules that would disagree with it).
import js from '@eslint/js';
import prettier from 'eslint-config-prettier';
import reactHooks from 'eslint-plugin-react-hooks';
import globals from 'globals';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  { ignores: ['build/', '.react-router/', '.data/', 'node_modules/', 'coverage/', 'drizzle/migrations/'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    plugins: { 'react-hooks': reactHooks },
    rules: {
      'react-hooks/rules-of-hooks': 'error',
      'react-hooks/exhaustive-deps': 'error',
      '@typescript-eslint/consistent-type-imports': ['error', { fixStyle: 'inline-type-imports', disallowTypeAnnotations: false }],
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none' }],
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              regex: '^(\\.\\./)+(app|realtime|drizzle|tests)(/|$)',
              message: 'Import across top-level folders with #app/*, #realtime/*, #drizzle/* or #tests/* (tsconfig paths).',
            },
          ],
        },
      ],
      eqeqeq: ['error', 'always', { null: 'ignore' }],
      'no-console': 'off',
    },
  },
  {
    // The browser bundle (components, pure code) must not import the schema; routes reach the
    // database through models (DEVELOPERS.md, Layout: thin route modules).
    files: ['app/components/**', 'app/lib/**', 'app/routes/**'],
    ignores: ['app/**/*.server.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              regex: '^(\\.\\./)+(app|realtime|drizzle|tests)(/|$)',
              message: 'Import across top-level folders with #app/*, #realtime/*, #drizzle/* or #tests/* (tsconfig paths).',
            },
            {
              regex: '^#drizzle/',
              message: 'Components, app/lib and routes never import the database schema; go through a model (app/models/*.server.ts).',
            },
          ],
        },
      ],
    },
  },
  prettier,
);
