import js from '@eslint/js';
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
    },
  },
);
