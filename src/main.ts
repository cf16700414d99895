import { createApp } from 'vue';
import { createPinia } from 'pinia';
import { Quasar } from 'quasar';
import '@fontsource/source-sans-3/400.css';
import '@fontsource/source-sans-3/600.css';
import '@fontsource/source-sans-3/700.css';
import 'quasar/dist/quasar.css';
import './css/app.css';
import App from './App.vue';
import { createCairnRouter } from './router';
import { QUASAR_BRAND, applyPalette } from './theme/palette';
import { i18n } from './i18n';
import { keepQuasarApp } from './quasar-later';
import { phoneIconSet } from './theme/phone-icons';
import { nextTask } from './boot/next-task';

// The start's steps, each in a task of its own (nextTask): this module's and its imports' first run; Vue, Pinia
// and Quasar; the catalogs and the router (its first history entry); the first route's guards, then its page's
// files asked for (router/index.ts); the page's arrival (the history entry made final); the mount.
async function start(): Promise<void> {
  await nextTask();
  applyPalette(document.documentElement.style);
  const app = createApp(App);
  app.use(createPinia());
  // Notify, Dialog and the MDI icon set come with the first facilitator's screen (quasar-later.ts); the phone's
  // icon set names only what its Quasar components draw by themselves (theme/phone-icons.ts).
  app.use(Quasar, {
    iconSet: phoneIconSet,
    config: {
      brand: { ...QUASAR_BRAND },
      notify: { position: 'top' },
    },
  });
  keepQuasarApp(app);
  await nextTask();
  app.use(i18n);
  const router = createCairnRouter();
  await nextTask();
  app.use(router);
  // Mounted once the first route is resolved (its page loaded, its guards passed): mounting empties `#app`,
  // and a joined phone's page has already painted its kept screen there (src/boot/first-screen.ts), which
  // should give way to the page itself, not to an empty layout.
  await router.isReady().catch(() => undefined);
  await nextTask();
  app.mount('#app');
}
void start();
