import { readdirSync } from 'node:fs';
import path from 'node:path';
import js from '@eslint/js';
import pluginQuery from '@tanstack/eslint-plugin-query';
import { createNodeResolver, importX } from 'eslint-plugin-import-x';
import reactHooks from 'eslint-plugin-react-hooks';
import globals from 'globals';
import tseslint from 'typescript-eslint';

const featuresDir = path.join(import.meta.dirname, 'src', 'features');
/** Features do not import each other (DEVELOPERS.md): the route that shows both composes them. */
const featureZones = readdirSync(featuresDir, { withFileTypes: true })
  .filter((entry) => entry.isDirectory())
  .map((entry) => ({
    target: path.join(featuresDir, entry.name),
    from: featuresDir,
    except: [`./${entry.name}`],
    message: 'A feature must not import another feature; compose them in the route under src/app/routes.',
  }));

export default tseslint.config(
  { ignores: ['dist', 'node_modules', '.data', 'test-results'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  ...pluginQuery.configs['flat/recommended'],
  {
    files: ['**/*.{ts,tsx}'],
    plugins: { 'import-x': importX, 'react-hooks': reactHooks },
    languageOptions: { globals: { ...globals.browser, ...globals.node } },
    settings: {
      'import-x/resolver-next': [createNodeResolver({ extensions: ['.ts', '.tsx', '.js', '.json'] })],
    },
    rules: {
      ...reactHooks.configs.recommended.rules,
      'import-x/order': [
        'warn',
        { groups: ['builtin', 'external', 'internal', 'parent', 'sibling'], 'newlines-between': 'never' },
      ],
      'import-x/no-cycle': 'error',
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/consistent-type-imports': 'error',
    },
  },
  {
    files: ['shared/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        { patterns: ['**/server/**', '**/src/**', 'sequelize', 'express', 'node:*'] },
      ],
    },
  },
  {
    files: ['src/**/*.{ts,tsx}'],
    rules: {
      'no-restricted-imports': ['error', { patterns: ['**/server/**', 'node:*'] }],
      'import-x/no-restricted-paths': ['error', { zones: featureZones }],
    },
  },
);
