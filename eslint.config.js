// Cairn's lint rules: the recommended sets of ESLint, typescript-eslint and eslint-plugin-vue.
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import pluginVue from 'eslint-plugin-vue';
import globals from 'globals';
import vueI18n from '@intlify/eslint-plugin-vue-i18n';

/** The participant's screens: they speak from the participant's catalogs (src/i18n/locales). */
const PARTICIPANT_SCREENS = [
  'src/pages/join.vue',
  'src/pages/phone.vue',
  'src/pages/phone-data.vue',
  'src/pages/live-projector.vue',
  'src/components/live/LanguagePicker.vue',
  'src/components/live/CountdownClock.vue',
  'src/components/activities/ActivityPhone.vue',
  'src/components/activities/ActivityProjector.vue',
  'src/components/activities/NoteComposer.vue',
  'src/components/activities/GuidedComposer.vue',
  'src/components/activities/PhotoComposer.vue',
  'src/components/activities/PhotoThumb.vue',
  'src/components/activities/StoryboardList.vue',
  'src/components/activities/NotesByPart.vue',
  'src/components/voting/VotePhone.vue',
  'src/components/voting/DotBallot.vue',
  'src/components/voting/RankBallot.vue',
  'src/components/voting/VoteProjector.vue',
  'src/components/results/MyDataCard.vue',
];

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
  // The participant's screens speak from the message catalogs (src/i18n/locales): no bare words in their templates.
  {
    files: PARTICIPANT_SCREENS,
    plugins: { '@intlify/vue-i18n': vueI18n },
    settings: { 'vue-i18n': { localeDir: './src/i18n/locales/*.json', messageSyntaxVersion: '^11.0.0' } },
    rules: {
      '@intlify/vue-i18n/no-raw-text': ['error', { ignorePattern: '^[-#:()&·×←✓…/+—\\s\\d]+$', ignoreText: ['OK', '·', '—', '✓', '…', '/join'] }],
    },
  },
  // Every other screen (the facilitator's, and the parts both share) speaks from the facilitator's catalogs (src/i18n/facilitator):
  // no bare words in their templates, in text or in the attributes people read (labels, hints, titles, placeholders,
  // accessible names).
  {
    files: ['src/**/*.vue'],
    ignores: [...PARTICIPANT_SCREENS],
    plugins: { '@intlify/vue-i18n': vueI18n },
    settings: { 'vue-i18n': { localeDir: './src/i18n/facilitator/*.json', messageSyntaxVersion: '^11.0.0' } },
    rules: {
      '@intlify/vue-i18n/no-raw-text': [
        'error',
        {
          ignorePattern: '^[-–#:()&·×←→↔✓…/+—′\\s\\d]*$',
          ignoreText: ['Cairn'],
          attributes: { '/.+/': ['label', 'title', 'placeholder', 'hint', 'aria-label', 'alt', 'error-message', 'no-data-label'] },
        },
      ],
    },
  },
  ...boundaries(),
);

/**
 * The architecture's "nevers" (DEVELOPERS.md), as `no-restricted-imports` patterns. ESLint keeps only
 * the last options of a rule that several blocks give one file, so every block below lists all the
 * nevers that apply to its files; tests/server/boundaries.test.ts lints a forbidden import of each.
 */
function boundaries() {
  const never = {
    shared: [
      { group: ['**/server/**', '../server', '**/src/**', '../src', '@/*'], message: 'shared/ is imported by the client and the server; it imports neither.' },
      { group: ['node:*', 'fs', 'path', 'crypto', 'os', 'vue', 'quasar', 'pinia'], message: 'shared/ runs in the browser and in Node: no runtime-specific modules.' },
    ],
    client: [{ group: ['**/server/**', '../server'], message: 'The client talks to the server over HTTP and sockets, never by import.' }],
    service: [{ group: ['**/*.socket', '**/*.socket.js', '**/*.router', '**/*.router.js'], message: 'A service holds the rules; handlers call services, never the other way round.' }],
    router: [{ group: ['**/*.router', '**/*.router.js'], message: 'A router never imports another router: put what both need in the feature\'s service or in server/common/.' }],
    db: [{ group: ['**/features/**', '../features'], message: 'The database layer never reaches into a feature: put what both need in server/common/.' }],
    auth: [{ group: ['**/users/**', '../users'], message: 'auth and users never import each other: put what both need in server/common/.' }],
    users: [{ group: ['**/auth/**', '../auth'], message: 'auth and users never import each other: put what both need in server/common/.' }],
  };
  const block = (files, ...names) => ({
    files,
    rules: { 'no-restricted-imports': ['error', { patterns: names.flatMap((n) => never[n]) }] },
  });
  const blocks = [
    block(['shared/**/*.ts'], 'shared'),
    block(['src/**/*.ts', 'src/**/*.vue'], 'client'),
    block(['server/db/**/*.ts'], 'db'),
    block(['server/**/*.service.ts'], 'service'),
    block(['server/**/*.router.ts'], 'router'),
  ];
  for (const feature of ['auth', 'users']) {
    const dir = `server/features/${feature}`;
    blocks.push(block([`${dir}/**/*.ts`], feature), block([`${dir}/**/*.service.ts`], feature, 'service'), block([`${dir}/**/*.router.ts`], feature, 'router'));
  }
  return blocks;
}
