// ESLint for the whole repository: TypeScript everywhere, Vue's recommended rules for the client, and Prettier
// owning layout (eslint-config-prettier switches off the rules that would fight it).
import js from '@eslint/js';
import prettier from 'eslint-config-prettier';
import vue from 'eslint-plugin-vue';
import globals from 'globals';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  { ignores: ['dist/', 'node_modules/', 'storage/', '.cache/', 'tests/e2e/artifacts/', 'docs/'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  ...vue.configs['flat/recommended'],
  {
    files: ['**/*.vue'],
    languageOptions: { parserOptions: { parser: tseslint.parser } },
  },
  {
    languageOptions: {
      ecmaVersion: 2023,
      sourceType: 'module',
      globals: { ...globals.node },
    },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      eqeqeq: ['error', 'always'],
      // `declare global { namespace Express { … } }` is how Express and multer types are augmented.
      '@typescript-eslint/no-namespace': ['error', { allowDeclarations: true }],
      'no-console': 'off',
    },
  },
  {
    // Jobs are created only by the core's enqueueJob, whose payload is typed by the job table in shared/jobs.ts.
    files: ['server/**/*.ts', 'worker/**/*.ts'],
    ignores: ['server/core/jobs/enqueue.ts'],
    rules: {
      'no-restricted-syntax': [
        'error',
        {
          selector: "CallExpression[callee.object.name='Job'][callee.property.name=/^(create|bulkCreate|upsert)$/]",
          message: 'Create jobs with enqueueJob(kind, payload, { transaction }) from server/core/jobs/enqueue.ts.',
        },
      ],
    },
  },
  {
    files: ['src/**/*.{ts,vue}'],
    languageOptions: { globals: { ...globals.browser } },
  },
  prettier,
  // Prettier owns layout, including where a tag's first attribute goes.
  { rules: { 'vue/first-attribute-linebreak': 'off' } },
);
