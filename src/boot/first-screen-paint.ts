/**
 * The HTML shell's inline script (see first-screen.ts): on a joined phone's page, paints the screen it
 * kept before Cairn's scripts arrive. Runs once, as the parser reaches it, right after `#app`.
 */
import { applyPalette } from '../theme/palette';
import { firstScreenFor, paintFirstScreen } from './first-screen';

try {
  const root = document.getElementById('app');
  const screen = root ? firstScreenFor(location.pathname, localStorage) : null;
  if (root && screen) {
    // The page's colours are CSS variables the app writes as it starts (main.ts does it again).
    applyPalette(document.documentElement.style);
    paintFirstScreen(document, root, screen, Date.now());
  }
} catch {
  // Blocked storage or anything unexpected: the page shows its first screen once its scripts have run, as without this.
}
