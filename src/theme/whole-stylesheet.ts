/**
 * A phone route's HTML shell carries only the phone's part of the stylesheet, written into the page
 * (`routeShells` in vite.config.ts), and names the whole stylesheet in its `data-cairn-whole`. Before any
 * screen that is not a phone's, the router adds the whole stylesheet right after it (so it cascades before
 * the pages' own styles, as it does from index.html) and waits until it applies. Elsewhere, and on the
 * development server, the whole stylesheet is already there and this does nothing.
 */
let loading: Promise<void> | null = null;

export function wholeStylesheet(): Promise<void> {
  const phoneStyles = document.querySelector<HTMLElement>('[data-cairn-whole]');
  if (!phoneStyles?.dataset.cairnWhole) return Promise.resolve();
  loading ??= new Promise<void>((resolve) => {
    const link = document.createElement('link');
    link.rel = 'stylesheet';
    link.crossOrigin = '';
    link.href = phoneStyles.dataset.cairnWhole!;
    // Without the whole stylesheet the screen still works: better plain than nothing.
    link.onload = link.onerror = () => resolve();
    phoneStyles.after(link);
  });
  return loading;
}
