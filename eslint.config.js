import js from '@eslint/js';
import globals from 'globals';
import tseslint from 'typescript-eslint';

/**
 * The linter: ESLint's and typescript-eslint's recommended rules (without type information, so
 * it stays fast), and a hard limit on line length for what the formatter cannot wrap (long
 * strings, comments). Formatting itself is Prettier's (.prettierrc.json).
 */
export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', 'tests/reference/**', 'docs/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    rules: {
      'max-len': ['error', { code: 180, tabWidth: 2, ignoreUrls: true }],
      // kept on purpose: a parameter whose name starts with _ (the signature requires it), and a
      // property destructured beside a rest element (taken out so that the rest leaves it out)
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', ignoreRestSiblings: true }],
    },
  },
  {
    // TypeScript itself reports undefined names, and knows the types' globals that no-undef does not
    files: ['**/*.ts'],
    rules: { 'no-undef': 'off' },
  },
  {
    // the plain JavaScript files (the `syncring` command, its link step, this file) run on Node
    files: ['**/*.js'],
    languageOptions: { globals: globals.node },
  },
);
