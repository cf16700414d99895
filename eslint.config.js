// Cairn's lint rules: the recommended sets of ESLint, typescript-eslint and eslint-plugin-vue.
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import pluginVue from 'eslint-plugin-vue';
import globals from 'globals';

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', '.test-output/**', 'data/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  ...pluginVue.configs['flat/recommended'],
  {
    files: ['**/*.vue'],
    languageOptions: { parserOptions: { parser: tseslint.parser } },
  },
  {
    languageOptions: { globals: { ...globals.browser, ...globals.node } },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/ban-ts-comment': 'error',
      'vue/multi-word-component-names': 'off',
      'vue/max-attributes-per-line': 'off',
      'vue/singleline-html-element-content-newline': 'off',
      'vue/html-self-closing': 'off',
      'vue/attribute-hyphenation': 'off',
      'vue/v-on-event-hyphenation': 'off',
      'vue/html-closing-bracket-newline': 'off',
      'vue/multiline-html-element-content-newline': 'off',
      'vue/html-indent': 'off',
      'vue/first-attribute-linebreak': 'off',
      'vue/no-v-html': 'error',
    },
  },
  // The architecture's "nevers" (DEVELOPERS.md): shared/ imports neither the server, the client
  // nor Node; the client never imports the server; a service never imports a handler.
  {
    files: ['shared/**/*.ts'],
    rules: {
      'no-restricted-imports': ['error', {
        patterns: [
          { group: ['**/server/**', '../server', '**/src/**', '../src', '@/*'], message: 'shared/ is imported by the client and the server; it imports neither.' },
          { group: ['node:*', 'fs', 'path', 'crypto', 'os', 'vue', 'quasar', 'pinia'], message: 'shared/ runs in the browser and in Node: no runtime-specific modules.' },
        ],
      }],
    },
  },
  {
    files: ['src/**/*.ts', 'src/**/*.vue'],
    rules: {
      'no-restricted-imports': ['error', {
        patterns: [{ group: ['**/server/**', '../server'], message: 'The client talks to the server over HTTP and sockets, never by import.' }],
      }],
    },
  },
  {
    files: ['server/**/*.service.ts'],
    rules: {
      'no-restricted-imports': ['error', {
        patterns: [{ group: ['**/*.socket', '**/*.socket.js', '**/*.router', '**/*.router.js'], message: 'A service holds the rules; handlers call services, never the other way round.' }],
      }],
    },
  },
);
