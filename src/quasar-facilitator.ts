import type { App } from 'vue';
import { Dialog, IconSet, Notify } from 'quasar';
import iconSet from 'quasar/icon-set/svg-mdi-v7';

interface Installable {
  install(opts: { $q: unknown; parentApp: App }): void;
  __installed?: boolean;
}

/** What `app.use(Quasar, { plugins: { Notify, Dialog }, iconSet })` would install at start (see quasar-later.ts). */
export function install(app: App): void {
  const $q = app.config.globalProperties.$q;
  for (const plugin of [Notify, Dialog] as unknown as Installable[]) {
    if (plugin.__installed) continue;
    plugin.install({ $q, parentApp: app });
    plugin.__installed = true;
  }
  IconSet.set(iconSet);
}
