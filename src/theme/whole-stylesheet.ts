/**
 * A phone route's HTML shell carries only the phone's part of the stylesheet, written into the page, and keeps
 * the link to the whole stylesheet with a type that is no stylesheet language (`data-cairn-whole`; `routeShells`
 * in vite.config.ts): a browser does not fetch a stylesheet of a type it does not know, and Vite's loader of lazy
 * files, finding the link by its `rel` and `href`, does not fetch it either. (A `disabled` link would be fetched
 * all the same by some Chromium versions' preload scanner.) Before any screen that is not a phone's, the router
 * takes the type away and waits until the stylesheet applies; where it stands, it cascades as it does from
 * index.html. Elsewhere, and on the development server, the whole stylesheet is already there and this does nothing.
 */
export const WHOLE_STYLESHEET_LATER = 'text/x-cairn-later';

let loading: Promise<void> | null = null;

export function wholeStylesheet(): Promise<void> {
  const link = document.querySelector<HTMLLinkElement>(`link[data-cairn-whole][type="${WHOLE_STYLESHEET_LATER}"]`);
  if (!link) return loading ?? Promise.resolve();
  loading = new Promise<void>((resolve) => {
    // Without the whole stylesheet the screen still works: better plain than nothing.
    link.onload = link.onerror = () => resolve();
    link.removeAttribute('type');
  });
  return loading;
}
