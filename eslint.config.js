// Cairn's lint rules: the recommended sets of ESLint, typescript-eslint and eslint-plugin-vue.
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import pluginVue from 'eslint-plugin-vue';
import globals from 'globals';
import vueI18n from '@intlify/eslint-plugin-vue-i18n';

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
    files: ['src/pages/join.vue',
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
    ],
    plugins: { '@intlify/vue-i18n': vueI18n },
    settings: { 'vue-i18n': { localeDir: './src/i18n/locales/*.json', messageSyntaxVersion: '^11.0.0' } },
    rules: {
      '@intlify/vue-i18n/no-raw-text': ['error', { ignorePattern: '^[-#:()&·×←✓…/+—\\s\\d]+$', ignoreText: ['OK', '·', '—', '✓', '…', '/join'] }],
    },
  },
  // The facilitator's screens speak from their own catalogs (src/i18n/facilitator): no bare words in their templates,
  // in text or in the attributes people read (labels, hints, titles, placeholders, accessible names). The list grows as
  // each facilitator's screen moves over.
  {
    files: [
      'src/layouts/ConsoleLayout.vue',
      'src/pages/sign-in.vue',
      'src/pages/workshops.vue',
      'src/pages/live-console.vue',
      'src/components/live/DriftPanel.vue',
      'src/components/plan/PeoplePanel.vue',
      'src/components/plan/SessionsPanel.vue',
      'src/components/results/RetentionPanel.vue',
      'src/components/results/SendReportDialog.vue',
      'src/pages/workshop-plan.vue',
      'src/components/plan/ScheduleSummary.vue',
      'src/pages/packing-list.vue',
      'src/components/plan/AgendaBuilder.vue',
      'src/pages/workshop-report.vue',
      'src/pages/workshop-results.vue',
      'src/components/results/ExportPanel.vue',
      'src/components/results/SessionChooser.vue',
      'src/components/activities/ModerationBoard.vue',
      'src/components/activities/ModerationNote.vue',
      'src/components/activities/ActivityConsole.vue',
      'src/components/activities/RoundsPanel.vue',
      'src/components/activities/TeamsPanel.vue',
      'src/components/activities/TeamSizeWarnings.vue',
      'src/components/plan/NewWorkshopDialog.vue',
      'src/components/plan/DateField.vue',
      'src/components/voting/VoteConsole.vue',
      'src/components/voting/VoteSetup.vue',
      'src/components/voting/CarryForward.vue',
      'src/components/voting/TeamSortConsole.vue',
      'src/components/voting/DotResults.vue',
      'src/components/voting/PreferenceResultsView.vue',
      'src/components/results/ActivityResults.vue',
      'src/components/results/AgendaRunTable.vue',
      'src/components/results/CriteriaMatrixPlot.vue',
      'src/components/results/FeedbackGrids.vue',
      'src/components/results/NotesSection.vue',
      'src/components/results/PhotosSection.vue',
      'src/components/results/ResultPhoto.vue',
      'src/components/results/TeamsParticipation.vue',
      'src/components/results/VoteSection.vue',
    ],
    plugins: { '@intlify/vue-i18n': vueI18n },
    settings: { 'vue-i18n': { localeDir: './src/i18n/facilitator/*.json', messageSyntaxVersion: '^11.0.0' } },
    rules: {
      '@intlify/vue-i18n/no-raw-text': [
        'error',
        {
          ignorePattern: '^[-–#:()&·×←→↔✓…/+—′\\s\\d]+$',
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
