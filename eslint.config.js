// @ts-check
import tseslint from 'typescript-eslint';

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', 'test-artifacts/**', 'public/**'] },
  ...tseslint.configs.recommended,
  {
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
    },
  },
  {
    // The core is UI-free: it runs in a worker and in Node. tsconfig.core.json also type-checks it without the DOM lib.
    files: ['src/core/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: ['react', 'react-dom', 'react/*', 'react-dom/*'], message: 'src/core must not depend on React.' },
            { group: ['zustand', 'zustand/*'], message: 'src/core must not depend on the UI store.' },
            { group: ['plotly.js*'], message: 'src/core must not depend on Plotly (charts render on the main thread).' },
            { group: ['**/ui/**', '**/worker/**', '**/cli/**'], message: 'src/core must not import its adapters.' },
            { group: ['node:*', 'fs', 'path', 'os', 'child_process'], message: 'src/core runs in browsers too: take bytes, not paths.' },
          ],
        },
      ],
      'no-restricted-globals': ['error', 'document', 'window', 'localStorage', 'navigator'],
    },
  },
  {
    files: ['src/core/**/*.test.ts'],
    rules: { 'no-restricted-imports': 'off' },
  },
);
