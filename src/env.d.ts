/// <reference types="vite/client" />
/// <reference types="vite-plugin-pwa/client" />
declare module '*.vue' {
  import type { DefineComponent } from 'vue';
  const component: DefineComponent<object, object, unknown>;
  export default component;
}
/** The join screen's first words in each language, picked from the catalogs at build time (vite.config.ts, src/boot/join-screen.ts). */
declare module 'virtual:cairn-join-words' {
  const words: Record<import('../shared/locales').Locale, import('./boot/join-screen').JoinWords>;
  export default words;
}
