import { createApp } from 'vue';
import { createPinia } from 'pinia';
import { Quasar, Notify, Dialog } from 'quasar';
import iconSet from 'quasar/icon-set/svg-mdi-v7';
import '@fontsource/source-sans-3/400.css';
import '@fontsource/source-sans-3/600.css';
import '@fontsource/source-sans-3/700.css';
import 'quasar/dist/quasar.css';
import './css/app.css';
import App from './App.vue';
import { createCairnRouter } from './router';
import { QUASAR_BRAND, applyPalette } from './theme/palette';
import { i18n } from './i18n';

applyPalette(document.documentElement.style);
const app = createApp(App);
app.use(createPinia());
app.use(Quasar, {
  plugins: { Notify, Dialog },
  iconSet,
  config: {
    brand: { ...QUASAR_BRAND },
    notify: { position: 'top' },
  },
});
app.use(i18n);
app.use(createCairnRouter());
app.mount('#app');
