/**
 * The HTML shell's inline script (see first-screen.ts and join-screen.ts): on a joined phone's page, paints
 * the screen it kept, and on a join route the join screen, before Cairn's scripts arrive. Runs once, as the
 * parser reaches it, right after `#app`.
 */
import joinWords from 'virtual:cairn-join-words';
import { applyPalette, applyQuasarBrand } from '../theme/palette';
import { phoneLocaleOf } from '../i18n/phone-locale';
import { firstScreenFor, paintFirstScreen } from './first-screen';
import { joinCodeOf, paintJoinScreen } from './join-screen';

try {
  const root = document.getElementById('app');
  const screen = root ? firstScreenFor(location.pathname, localStorage) : null;
  const code = root && !screen ? joinCodeOf(location.pathname) : null;
  if (root && (screen || code !== null)) {
    // The page's colours are CSS variables the app writes as it starts (main.ts and Quasar do it again).
    applyPalette(document.documentElement.style);
    applyQuasarBrand(document.body.style);
    if (screen) paintFirstScreen(document, root, screen, Date.now());
    else {
      const locale = phoneLocaleOf(localStorage, navigator.languages ?? [navigator.language]);
      paintJoinScreen(document, root, joinWords[locale], locale, code!);
    }
  }
} catch {
  // Blocked storage or anything unexpected: the page shows its first screen once its scripts have run, as without this.
}
