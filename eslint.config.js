// ESLint flat config. The import-boundary rule keeps the pure core (geodesy, fit, campaign)
// free of I/O layers; see DEVELOPERS.md "Layers".
import js from '@eslint/js';
import globals from 'globals';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';

const ioLayers = ['store', 'sync', 'ui', 'server', 'io', 'worker', 'cli'];
const pureBoundary = {
  'no-restricted-imports': ['error', {
    patterns: [
      { group: ioLayers.flatMap((l) => [`../${l}`, `../${l}/*`, `../../${l}`, `../../${l}/*`]),
        message: 'The pure core (geodesy, fit, campaign) must not import an I/O layer.' },
      { group: ['dexie', 'fastify', 'better-sqlite3', 'pg', 'react', 'react-dom', '@ionic/*', '@capacitor/*', 'node:fs', 'node:fs/*', 'fs', 'node:http', 'node:net'],
        message: 'The pure core does no I/O.' },
    ],
  }],
};

export default tseslint.config(
  { ignores: ['dist', 'dev-dist', 'node_modules', 'data', 'test/artifacts', 'bench/data', 'bench/results', 'android', 'ios'] },
  js.configs.recommended,
  ...tseslint.configs.recommendedTypeChecked,
  {
    files: ['**/*.{ts,tsx}'],
    languageOptions: {
      globals: { ...globals.browser, ...globals.node },
      parserOptions: { projectService: { allowDefaultProject: ['*.js', 'scripts/*.js', 'bin/*.js'] }, tsconfigRootDir: import.meta.dirname },
    },
    plugins: { 'react-hooks': reactHooks },
    rules: {
      ...reactHooks.configs.recommended.rules,
      '@typescript-eslint/no-explicit-any': 'error',
      '@typescript-eslint/require-await': 'off',
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
    },
  },
  { files: ['src/geodesy/**', 'src/fit/**', 'src/campaign/**'], rules: pureBoundary },
  { files: ['**/*.{js,mjs,cjs}'], extends: [tseslint.configs.disableTypeChecked], languageOptions: { globals: globals.node } },
);
