// Lint: typescript-eslint recommended, plus the rule that keeps the core free of the editor API.
import tseslint from 'typescript-eslint';

export default tseslint.config(
  { ignores: ['out/**', 'media/dist/**', 'node_modules/**', '.vscode-test/**', 'bin/**'] },
  ...tseslint.configs.recommended,
  {
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/no-explicit-any': 'warn',
    },
  },
  {
    // src/core is pure: no editor API, no Node built-ins (it also runs in the web extension host).
    files: ['src/core/**/*.ts'],
    rules: {
      'no-restricted-imports': ['error', {
        paths: [{ name: 'vscode', message: 'src/core must not import vscode: put editor code in src/extension.' }],
        patterns: [{ group: ['node:*', 'fs', 'path', 'os', 'child_process', 'worker_threads'], message: 'src/core runs in the browser too: no Node built-ins.' }],
      }],
    },
  },
);
