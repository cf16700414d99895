/**
 * A phone route's HTML shell carries only the phone's part of the stylesheet, written into the page, and keeps
 * the link to the whole stylesheet disabled (`data-cairn-whole`; `routeShells` in vite.config.ts): a disabled
 * stylesheet is not fetched, and Vite's loader of lazy files, finding the link, does not fetch it either. Before
 * any screen that is not a phone's, the router enables it and waits until it applies; where it stands, it
 * cascades as it does from index.html. Elsewhere, and on the development server, the whole stylesheet is
 * already there and this does nothing.
 */
let loading: Promise<void> | null = null;

export function wholeStylesheet(): Promise<void> {
  const link = document.querySelector<HTMLLinkElement>('link[data-cairn-whole][disabled]');
  if (!link) return loading ?? Promise.resolve();
  loading = new Promise<void>((resolve) => {
    // Without the whole stylesheet the screen still works: better plain than nothing.
    link.onload = link.onerror = () => resolve();
    link.removeAttribute('disabled');
  });
  return loading;
}
